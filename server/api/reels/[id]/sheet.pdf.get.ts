import { serveSheet } from '../../../utils/sheet-download'

/** The pass/fail sheet of the reel's standing sign-off (or ?signoff=N, an earlier one) as PDF. */
export default defineEventHandler((event) => serveSheet(event, 'pdf'))
