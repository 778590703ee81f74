import { IdParams } from '../../../../shared/utils/validation'

/** The clip's per-frame timeline, one binary object (shared/utils/clip-timeline.ts decodes it). */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { clip } = await requireClip(event, id, 'view')
  if (!clip.timelineKey) throw createError({ statusCode: 409, statusMessage: 'This clip has not been measured yet' })
  const bytes = await useStorageS3().get(clip.timelineKey)
  setResponseHeader(event, 'content-type', 'application/octet-stream')
  setResponseHeader(event, 'cache-control', 'private, max-age=60')
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
})
