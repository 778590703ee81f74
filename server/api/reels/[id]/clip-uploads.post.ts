import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { CLIP_LIMITS, ClipPresignBody } from '../../../../shared/utils/clips'
import { checkFileName, IntakeError } from '../../../lib/intake'
import { clipKeys } from '../../../../server/lib/clips/keys'

const URL_HOURS = 12

/**
 * Announces a clip and hands out presigned part URLs: the browser sends the clip straight to
 * S3 in parts (each can be sent again on its own), then calls /api/clips/:id/complete.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  await assertReelOpen(reel.id)
  const body = await readValidatedBody(event, ClipPresignBody.parse)
  let name: string
  try {
    name = checkFileName(body.name)
  } catch (e) {
    if (e instanceof IntakeError) throw createError({ statusCode: e.status, statusMessage: e.reason })
    throw e
  }
  const db = useDb()
  const storage = useStorageS3()
  const uploadExpiresAt = new Date(Date.now() + URL_HOURS * 3600_000)
  const clipId = firstId(await db.insert(tables.clips).values({
    teamId: reel.teamId, reelId: reel.id, name, objectKey: '', bytes: body.size, status: 'uploading', uploadExpiresAt, uploadedBy: user.id,
  }).$returningId())
  const objectKey = clipKeys.original(reel.teamId, reel.id, clipId)
  const multipartId = await storage.startMultipart(objectKey)
  await db.update(tables.clips).set({ objectKey, multipartId }).where(eq(tables.clips.id, clipId))
  const count = Math.ceil(body.size / CLIP_LIMITS.partSize)
  const parts = await Promise.all(Array.from({ length: count }, (_, i) => storage.presignPart(objectKey, multipartId, i + 1, URL_HOURS * 3600)
    .then((url) => ({ partNumber: i + 1, url }))))
  setResponseStatus(event, 201)
  return { clipId, name, partSize: CLIP_LIMITS.partSize, parts, expiresAt: uploadExpiresAt }
})
