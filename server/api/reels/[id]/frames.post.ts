import { z } from 'zod'
import { IdParams } from '../../../../shared/utils/validation'
import { FRAME_FORMATS, UPLOAD_LIMITS, formatFromName, type FrameFormat } from '../../../../shared/utils/uploads'

const Query = z.object({
  /** For raw Y'CbCr files: their format and size, which the bytes cannot tell. */
  raw: z.enum(['uyvy', 'v210']).optional(),
  width: z.coerce.number().int().min(2).max(16384).optional(),
  height: z.coerce.number().int().min(1).max(16384).optional(),
})

/**
 * Upload for scripts: multipart/form-data with one or more files. Every file is answered
 * on its own (stored and queued, a duplicate, or refused with a reason).
 *   curl -b cookies -F file=@a.png -F file=@b.png $URL/api/reels/7/frames
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const q = await getValidatedQuery(event, Query.parse)
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (length > UPLOAD_LIMITS.maxBytes * 4) {
    throw createError({ statusCode: 413, statusMessage: `A request may carry at most ${UPLOAD_LIMITS.maxBytes * 4 / 2 ** 20} MiB; send fewer files at a time` })
  }
  const parts = await readMultipartFormData(event)
  const files = (parts ?? []).filter((p) => p.filename !== undefined)
  if (!files.length) throw createError({ statusCode: 400, statusMessage: 'Send the files as multipart/form-data fields with a file name' })
  if (files.length > UPLOAD_LIMITS.maxFilesPerRequest) throw createError({ statusCode: 413, statusMessage: `At most ${UPLOAD_LIMITS.maxFilesPerRequest} files per request` })
  const results = []
  for (const f of files) {
    const name = f.filename ?? ''
    const format: FrameFormat | null = q.raw ?? formatFromName(name) ?? 'png'
    if (f.data.length > UPLOAD_LIMITS.maxBytes) {
      results.push({ name: name.slice(0, 200), ok: false, status: 413, reason: `The file is larger than ${UPLOAD_LIMITS.maxBytes / 2 ** 20} MiB` })
      continue
    }
    // For stills the bytes decide the type; the name only matters for raw files.
    results.push(await intakeFile({
      teamId: reel.teamId, reelId: reel.id, userId: user.id, name, bytes: new Uint8Array(f.data.buffer, f.data.byteOffset, f.data.length),
      format: FRAME_FORMATS.includes(format) ? format : 'png', rawWidth: q.width, rawHeight: q.height,
    }))
  }
  const accepted = results.filter((r) => r.ok).length
  setResponseStatus(event, accepted === results.length ? 201 : accepted ? 207 : 422)
  return { files: results }
})
