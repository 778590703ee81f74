import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'

/**
 * One frame: its record and, once analysed, the analysis with the same field names as
 * `npm run analyse -- --json`, plus the histograms and the URLs of its images.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { frame, role } = await requireFrame(event, id, 'view')
  const [a] = await useDb().select().from(tables.analyses).where(eq(tables.analyses.frameId, frame.id)).limit(1)
  const { objectKey: _k, sha256: _s, ...pub } = frame
  return {
    frame: pub,
    role,
    analysis: a
      ? {
          ...(a.result as object),
          specVersion: a.specVersion,
          analysedAt: a.createdAt,
          durationMs: a.durationMs,
          histograms: a.histograms,
          images: Object.fromEntries((a.images as string[]).map((k) => [k, `/api/frames/${frame.id}/images/${k}`])),
        }
      : null,
  }
})
