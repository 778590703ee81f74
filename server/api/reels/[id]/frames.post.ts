import { z } from 'zod'
import { IdParams } from '../../../../shared/utils/validation'
import { FRAME_FORMATS, UPLOAD_LIMITS, formatFromName, type FrameFormat } from '../../../../shared/utils/uploads'
import { IntakeError, receiveFile } from '../../../lib/intake'
import { BodyTooLargeError, MultipartError, isMultipart, readMultipart } from '../../../lib/multipart'

const Query = z.object({
  /** For raw Y'CbCr files: their format and size, which the bytes cannot tell. */
  raw: z.enum(['uyvy', 'v210']).optional(),
  width: z.coerce.number().int().min(2).max(16384).optional(),
  height: z.coerce.number().int().min(1).max(16384).optional(),
})

/** The most one request may carry, declared (Content-Length) or chunked. */
const MAX_REQUEST_BYTES = UPLOAD_LIMITS.maxBytes * 4

const NOT_MULTIPART = 'Send the files as multipart/form-data fields with a file name'

/**
 * Upload for scripts: multipart/form-data with one or more files. Every file is answered
 * on its own (stored and queued, a duplicate, or refused with a reason).
 *   curl -b cookies -F file=@a.png -F file=@b.png $URL/api/reels/7/frames
 * The body is read as it arrives: each file is checked and hashed while its bytes come in,
 * then stored while the next one arrives, so no more than two files of a request are held.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const q = await getValidatedQuery(event, Query.parse)
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  const tooLarge = (files?: IntakeResult[]) => {
    // The rest of the body is not read: the connection closes after this answer.
    closeConnectionAfterAnswer(event)
    return createError({ statusCode: 413, statusMessage: `A request may carry at most ${MAX_REQUEST_BYTES / 2 ** 20} MiB; send fewer files at a time`, data: files ? { files } : undefined })
  }
  if (length > MAX_REQUEST_BYTES) throw tooLarge()
  if (!isMultipart(getRequestHeader(event, 'content-type'))) throw createError({ statusCode: 400, statusMessage: NOT_MULTIPART })

  const results: Promise<IntakeResult>[] = []
  // Files are stored one after the other, in the order they came, each while the next one
  // arrives.
  let storing: Promise<unknown> = Promise.resolve()
  let brokeOff: MultipartError | null = null
  try {
    await readMultipart(event.node.req, async ({ filename, stream }) => {
      const answer = (e: IntakeError) => { results.push(Promise.resolve(intakeRefusal(filename, e))) }
      if (results.length >= UPLOAD_LIMITS.maxFilesPerRequest) {
        stream.resume()
        return answer(new IntakeError(413, `At most ${UPLOAD_LIMITS.maxFilesPerRequest} files per request; send this one again in another request`))
      }
      // For stills the bytes decide the type; the name only matters for raw files.
      const named: FrameFormat | null = q.raw ?? formatFromName(filename) ?? 'png'
      const format = FRAME_FORMATS.includes(named) ? named : 'png'
      let file
      try {
        file = await receiveFile(stream, { name: filename, format, rawWidth: q.width, rawHeight: q.height })
      } catch (e) {
        if (e instanceof IntakeError) return answer(e)
        throw e
      }
      const previous = storing
      const stored = previous.then(() => storeFrame({ teamId: reel.teamId, reelId: reel.id, userId: user.id, file }))
      // Rejections are awaited below or end the request; this only keeps Node from calling them unhandled meanwhile.
      stored.catch(() => {})
      storing = stored
      results.push(stored)
      // At most this file waits while the previous one is being stored.
      await previous
    }, { maxBytes: MAX_REQUEST_BYTES })
  } catch (e) {
    if (e instanceof BodyTooLargeError) {
      // Files that arrived whole before the cap are kept and queued; the answer says what happened to each.
      const settled = await Promise.allSettled(results)
      throw tooLarge(settled.flatMap((r) => (r.status === 'fulfilled' ? [r.value] : [])))
    }
    if (!(e instanceof MultipartError)) throw e
    // Files that arrived whole before the body broke off are answered; the one it broke
    // in is refused with its reason (receiveFile).
    if (!results.length) throw createError({ statusCode: 400, statusMessage: e.files ? `The upload broke off: ${e.message}; send it again` : NOT_MULTIPART })
    brokeOff = e
  }
  if (!results.length) throw createError({ statusCode: 400, statusMessage: NOT_MULTIPART })
  const files = await Promise.all(results)
  const accepted = files.filter((r) => r.ok).length
  setResponseStatus(event, accepted === files.length ? 201 : accepted ? 207 : 422)
  return brokeOff ? { files, error: `The upload broke off after ${files.length} file(s): ${brokeOff.message}` } : { files }
})
