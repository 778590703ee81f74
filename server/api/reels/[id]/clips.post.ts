import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { CLIP_LIMITS } from '../../../../shared/utils/clips'
import { checkFileName, IntakeError } from '../../../lib/intake'
import { MultipartError, isMultipart, readMultipart } from '../../../lib/multipart'
import { clipKeys, uploadPart } from '../../../../server/lib/clips/keys'

/** Parts sent to S3 while the body arrives: 200 GiB in 32 MiB parts stays within S3's 10 000. */
const PART_BYTES = 32 * 2 ** 20

/**
 * Upload of one clip for scripts: multipart/form-data with one file, streamed to S3 in
 * parts as it arrives (at most one part held), with the clips' own size cap.
 *   curl -b cookies -F file=@cut.mov $URL/api/reels/7/clips
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (length > CLIP_LIMITS.maxBytes + 2 ** 20) {
    throw createError({ statusCode: 413, statusMessage: `The clip is larger than ${CLIP_LIMITS.maxBytes / 2 ** 30} GiB` })
  }
  if (!isMultipart(getRequestHeader(event, 'content-type'))) throw createError({ statusCode: 400, statusMessage: 'Send the clip as a multipart/form-data field with a file name' })
  const db = useDb()
  const storage = useStorageS3()
  let answer: { status: number, body: Record<string, unknown> } | null = null
  try {
    await readMultipart(event.node.req, async ({ filename, stream }) => {
      if (answer) { stream.resume(); return }
      let name: string
      try {
        name = checkFileName(filename)
      } catch (e) {
        stream.resume()
        if (e instanceof IntakeError) { answer = { status: e.status, body: { ok: false, name: filename.slice(0, 200), reason: e.reason } }; return }
        throw e
      }
      const clipId = firstId(await db.insert(tables.clips).values({
        teamId: reel.teamId, reelId: reel.id, name, objectKey: '', bytes: 0, status: 'uploading', uploadedBy: user.id,
      }).$returningId())
      const objectKey = clipKeys.original(reel.teamId, reel.id, clipId)
      const multipartId = await storage.startMultipart(objectKey)
      await db.update(tables.clips).set({ objectKey, multipartId }).where(eq(tables.clips.id, clipId))
      const refuse = async (status: number, reason: string) => {
        await storage.abortMultipart(objectKey, multipartId)
        await db.update(tables.clips).set({ status: 'failed', failReason: reason, multipartId: null }).where(eq(tables.clips.id, clipId))
        answer = { status, body: { ok: false, name, reason } }
      }
      const parts: { partNumber: number, etag: string }[] = []
      let held: Buffer[] = []
      let heldBytes = 0
      let total = 0
      let over = false
      const flush = async () => {
        if (!heldBytes) return
        const body = Buffer.concat(held, heldBytes)
        held = []
        heldBytes = 0
        parts.push({ partNumber: parts.length + 1, etag: await uploadPart(storage, objectKey, multipartId, parts.length + 1, body) })
      }
      try {
        for await (const chunk of stream as AsyncIterable<Buffer>) {
          total += chunk.length
          if (over) continue
          if (total > CLIP_LIMITS.maxBytes) { over = true; held = []; heldBytes = 0; continue }
          held.push(chunk)
          heldBytes += chunk.length
          if (heldBytes >= PART_BYTES) await flush()
        }
      } catch {
        await refuse(400, 'The request ended before the clip was complete; send it again')
        return
      }
      if (over) return refuse(413, `The clip is larger than ${CLIP_LIMITS.maxBytes / 2 ** 30} GiB`)
      if (total === 0) return refuse(422, 'The file is empty')
      await flush()
      await storage.completeMultipart(objectKey, multipartId, parts)
      await db.update(tables.clips).set({ bytes: total }).where(eq(tables.clips.id, clipId))
      const [clip] = await db.select().from(tables.clips).where(eq(tables.clips.id, clipId)).limit(1)
      const result = await acceptStoredClip(clip!)
      answer = result.ok ? { status: 201, body: { ok: true, clip: clipView(result.clip) } } : { status: result.status, body: { ok: false, name, reason: result.reason } }
    })
  } catch (e) {
    if (!(e instanceof MultipartError)) throw e
    if (!answer) throw createError({ statusCode: 400, statusMessage: `The upload broke off: ${e.message}; send it again` })
  }
  if (!answer) throw createError({ statusCode: 400, statusMessage: 'Send the clip as a multipart/form-data field with a file name' })
  const a = answer as { status: number, body: Record<string, unknown> }
  setResponseStatus(event, a.status)
  return a.body
})
