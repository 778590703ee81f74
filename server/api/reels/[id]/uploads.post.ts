import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { PresignBody, UPLOAD_LIMITS } from '../../../../shared/utils/uploads'
import { checkFileName, IntakeError } from '../../../lib/intake'
import { keys } from '../../../lib/storage'

const URL_MINUTES = 60

/**
 * Announces files and hands out presigned PUT URLs (in parts above the multipart threshold).
 * Each file is answered on its own: a bad name refuses that file, not the batch.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const { files } = await readValidatedBody(event, PresignBody.parse)
  const storage = useStorageS3()
  const db = useDb()
  const expiresAt = new Date(Date.now() + URL_MINUTES * 60_000)
  const out = []
  for (const f of files) {
    try {
      const name = checkFileName(f.name)
      if ((f.format === 'uyvy' || f.format === 'v210') && (!f.rawWidth || !f.rawHeight)) {
        throw new IntakeError(422, `Raw ${f.format} needs its width and height`)
      }
      const uploadId = firstId(await db.insert(tables.uploads).values({
        teamId: reel.teamId, reelId: reel.id, userId: user.id, objectKey: '', name, bytes: f.size, format: f.format,
        rawWidth: f.rawWidth ?? null, rawHeight: f.rawHeight ?? null, expiresAt,
      }).$returningId())
      const objectKey = keys.upload(reel.teamId, reel.id, uploadId)
      if (f.size > UPLOAD_LIMITS.multipartThreshold) {
        const multipartId = await storage.startMultipart(objectKey)
        await db.update(tables.uploads).set({ objectKey, multipartId }).where(eq(tables.uploads.id, uploadId))
        const count = Math.ceil(f.size / UPLOAD_LIMITS.partSize)
        const parts = await Promise.all(Array.from({ length: count }, (_, i) => storage.presignPart(objectKey, multipartId, i + 1, URL_MINUTES * 60)
          .then((url) => ({ partNumber: i + 1, url }))))
        out.push({ name, ok: true, uploadId, partSize: UPLOAD_LIMITS.partSize, parts })
      } else {
        await db.update(tables.uploads).set({ objectKey }).where(eq(tables.uploads.id, uploadId))
        out.push({ name, ok: true, uploadId, url: await storage.presignPut(objectKey, f.size, URL_MINUTES * 60) })
      }
    } catch (e) {
      if (!(e instanceof IntakeError)) throw e
      out.push({ name: f.name.slice(0, 200), ok: false, status: e.status, reason: e.reason })
    }
  }
  return { files: out, expiresAt }
})
