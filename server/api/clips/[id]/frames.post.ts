import { and, eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { ClipFrameBody, QUEUE_CLIP, clipExtractJobId, type ClipJob } from '../../../../shared/utils/clips'

/**
 * A frame of the clip as a frame of the reel (full scopes): the kept one if there is one,
 * else the worker extracts it (202; ask again to get its id).
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { clip } = await requireClip(event, id, 'view')
  const { frame } = await readValidatedBody(event, ClipFrameBody.parse)
  if (clip.status !== 'done') throw createError({ statusCode: 409, statusMessage: 'The clip has not been measured yet' })
  if (frame >= (clip.framesMeasured ?? 0)) throw createError({ statusCode: 422, statusMessage: `The clip has ${clip.framesMeasured} frames (0–${(clip.framesMeasured ?? 1) - 1})` })
  const [kept] = await useDb().select({ frameId: tables.clipFrames.frameId }).from(tables.clipFrames)
    .where(and(eq(tables.clipFrames.clipId, clip.id), eq(tables.clipFrames.frameNumber, frame))).limit(1)
  if (kept) return { frameId: kept.frameId }
  await enqueue<ClipJob>(QUEUE_CLIP, 'extract', { kind: 'extract', clipId: clip.id, frame }, { jobId: clipExtractJobId(clip.id, frame) })
  setResponseStatus(event, 202)
  return { frameId: null, pending: true }
})
