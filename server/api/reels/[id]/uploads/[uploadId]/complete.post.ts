import { and, eq, isNull } from 'drizzle-orm'
import { z } from 'zod'
import { IdSchema } from '../../../../../../shared/utils/validation'
import { CompleteUploadBody } from '../../../../../../shared/utils/uploads'

const Params = z.object({ id: IdSchema, uploadId: IdSchema })

/**
 * The browser says a file is in S3. The server checks the object itself (size against the
 * announcement, bytes, dimensions) before it becomes a frame and is queued.
 */
export default defineEventHandler(async (event) => {
  const { id, uploadId } = await getValidatedRouterParams(event, Params.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const { parts } = await readValidatedBody(event, CompleteUploadBody.parse)
  const db = useDb()
  const [up] = await db.select().from(tables.uploads)
    .where(and(eq(tables.uploads.id, uploadId), eq(tables.uploads.reelId, reel.id), isNull(tables.uploads.completedAt))).limit(1)
  if (!up) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  if (up.expiresAt.getTime() < Date.now()) throw createError({ statusCode: 410, statusMessage: 'This upload expired; add the file again' })
  const storage = useStorageS3()
  if (up.multipartId) {
    if (!parts?.length) throw createError({ statusCode: 400, statusMessage: 'A file sent in parts needs the list of parts' })
    try {
      await storage.completeMultipart(up.objectKey, up.multipartId, parts)
    } catch (e) {
      throw createError({ statusCode: 422, statusMessage: `The parts could not be joined: ${(e as Error).message}` })
    }
  }
  const size = await storage.size(up.objectKey)
  if (size === null) throw createError({ statusCode: 409, statusMessage: 'The file has not arrived in storage; send it again' })
  const refuse = async (status: number, reason: string) => {
    await storage.delete(up.objectKey).catch(() => {})
    await db.update(tables.uploads).set({ completedAt: new Date() }).where(eq(tables.uploads.id, up.id))
    setResponseStatus(event, status)
    return { name: up.name, ok: false, status, reason }
  }
  if (size !== up.bytes) return refuse(422, `The stored file has ${size} bytes, ${up.bytes} were announced; send it again`)
  const bytes = await storage.get(up.objectKey)
  const result = await intakeFile({
    teamId: reel.teamId, reelId: reel.id, userId: user.id, name: up.name, bytes, format: up.format,
    rawWidth: up.rawWidth, rawHeight: up.rawHeight, storedAt: up.objectKey,
  })
  if (!result.ok) return refuse(result.status ?? 422, result.reason ?? 'Refused')
  await db.update(tables.uploads).set({ completedAt: new Date() }).where(eq(tables.uploads.id, up.id))
  // A duplicate keeps the first copy; this one is not needed.
  if (result.duplicate) await storage.delete(up.objectKey).catch(() => {})
  setResponseStatus(event, result.duplicate ? 200 : 201)
  return result
})
