import { serveSheet } from '../../../utils/sheet-download'

/** The same rows as the PDF's frames table, as CSV. */
export default defineEventHandler((event) => serveSheet(event, 'csv'))
