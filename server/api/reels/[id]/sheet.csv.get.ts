import { serveSheet } from '../../../lib/sheet-download'

/** The same rows as the PDF's frames table, as CSV. */
export default defineEventHandler((event) => serveSheet(event, 'csv'))
