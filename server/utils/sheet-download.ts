// The two sheet downloads (PDF and CSV) answer alike. Routes only: it reaches for the
// server's request helpers and auto-imported utilities, so it lives among them.
import { createError, getValidatedQuery, getValidatedRouterParams, setResponseHeader, setResponseHeaders, setResponseStatus, type H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import { z } from 'zod'
import { IdParams, IdSchema } from '../../shared/utils/validation'
import { QUEUE_SHEET, sheetJobId, type SheetJob } from '../../shared/utils/queues'
import { currentSignoff } from '../lib/sheet'
import { tables, useDb } from './db'
import { useQueue } from './redis'
import { requireReel } from './reels'
import { useStorageS3 } from './s3'

const Query = z.object({
  /** An earlier (superseded) sign-off of the same reel; the standing one when absent. */
  signoff: IdSchema.optional(),
  /** Save instead of show: the PDF opens in the browser by default (the sheet page previews it). */
  download: z.enum(['0', '1']).optional(),
})

/** ASCII for the plain filename parameter; the exact name goes in filename*. */
const slug = (s: string) => s.normalize('NFKD').replace(/[^\w\s-]/g, '').trim().replace(/[\s_]+/g, '-').slice(0, 60) || 'sheet'

const rfc5987 = (s: string) => encodeURIComponent(s).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)

export async function serveSheet(event: H3Event, kind: 'pdf' | 'csv') {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel } = await requireReel(event, id, 'downloadSheet')
  const q = await getValidatedQuery(event, Query.parse)
  const db = useDb()
  let signoff
  if (q.signoff) {
    [signoff] = await db.select().from(tables.signoffs).where(and(eq(tables.signoffs.id, q.signoff), eq(tables.signoffs.reelId, reel.id))).limit(1)
    if (!signoff) throw createError({ statusCode: 404, statusMessage: 'This reel has no sign-off with that number' })
  } else {
    signoff = await currentSignoff(db, reel.id)
    if (!signoff) {
      throw createError({ statusCode: 409, statusMessage: 'This reel is not signed off, so it has no pass/fail sheet yet. A reviewer signs it off once every frame is analysed and every failing frame decided.' })
    }
  }
  if (signoff.sheetStatus === 'pending') {
    // Re-adding under the same job id is a no-op while the job exists, and mends a sign-off
    // whose job was lost.
    await useQueue(QUEUE_SHEET).add('sheet', { signoffId: signoff.id } satisfies SheetJob, { jobId: sheetJobId(signoff.id) }).catch(() => {})
    setResponseStatus(event, 202)
    setResponseHeader(event, 'Retry-After', 3)
    return { status: 'pending', statusMessage: 'The sheet is being prepared; it is ready in a few seconds.' }
  }
  const key = kind === 'pdf' ? signoff.pdfKey : signoff.csvKey
  if (signoff.sheetStatus === 'failed' || !key) {
    throw createError({ statusCode: 409, statusMessage: signoff.sheetError ?? 'The sheet of this sign-off was not made' })
  }
  const bytes = await useStorageS3().get(key)
  const [production] = await db.select({ name: tables.productions.name }).from(tables.productions).where(eq(tables.productions.id, reel.productionId))
  const base = `${production?.name ?? 'production'} ${reel.name} sign-off ${signoff.id}${signoff.supersededAt ? ' superseded' : ''}`
  const file = `${slug(base)}.${kind}`
  const disposition = kind === 'pdf' && q.download !== '1' ? 'inline' : 'attachment'
  setResponseHeaders(event, {
    'Content-Type': kind === 'pdf' ? 'application/pdf' : 'text/csv; charset=utf-8',
    'Content-Disposition': `${disposition}; filename="${file}"; filename*=UTF-8''${rfc5987(`${base}.${kind}`)}`,
    'Cache-Control': 'private, no-cache',
    'X-Content-Type-Options': 'nosniff',
    'X-Linewise-Signoff': String(signoff.id),
    'X-Linewise-Superseded': signoff.supersededAt ? 'yes' : 'no',
  })
  return bytes
}
