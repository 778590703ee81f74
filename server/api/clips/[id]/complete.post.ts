import { and, eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { ClipCompleteBody } from '../../../../shared/utils/clips'

/**
 * The browser says every part is in S3. The parts are joined, the size checked against the
 * announcement, and the clip probed: it is then queued, or refused with the reason.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { clip } = await requireClip(event, id, 'upload')
  await assertReelOpen(clip.reelId)
  const { parts } = await readValidatedBody(event, ClipCompleteBody.parse)
  const db = useDb()
  const storage = useStorageS3()
  if (clip.status !== 'uploading') {
    // A second call (a retry after a lost answer) gets the same clip, not a second one.
    if (clip.status === 'failed') { setResponseStatus(event, 422); return { ok: false, clip: clipView(clip), reason: clip.failReason } }
    return { ok: true, clip: clipView(clip) }
  }
  if (!clip.multipartId) throw createError({ statusCode: 409, statusMessage: 'This clip is not being uploaded' })
  if (clip.uploadExpiresAt && clip.uploadExpiresAt.getTime() < Date.now()) {
    await storage.abortMultipart(clip.objectKey, clip.multipartId)
    await db.update(tables.clips).set({ status: 'failed', failReason: 'The upload expired before it was complete', multipartId: null }).where(eq(tables.clips.id, clip.id))
    throw createError({ statusCode: 410, statusMessage: 'This upload expired; add the clip again' })
  }
  // One completion per upload: parallel calls race for the multipart id, one wins.
  const [claim] = await db.update(tables.clips).set({ multipartId: null })
    .where(and(eq(tables.clips.id, clip.id), eq(tables.clips.multipartId, clip.multipartId)))
  if (claim.affectedRows !== 1) throw createError({ statusCode: 409, statusMessage: 'This clip is already being completed' })
  try {
    await storage.completeMultipart(clip.objectKey, clip.multipartId, parts)
  } catch (e) {
    // The parts stay in S3: the browser can send the missing ones and complete again.
    await db.update(tables.clips).set({ multipartId: clip.multipartId }).where(eq(tables.clips.id, clip.id))
    throw createError({ statusCode: 422, statusMessage: `The parts could not be joined (send the missing parts again): ${(e as Error).message}` })
  }
  const size = await storage.size(clip.objectKey)
  if (size !== clip.bytes) {
    await storage.delete(clip.objectKey).catch(() => {})
    const reason = `The stored clip has ${size ?? 0} bytes, ${clip.bytes} were announced; send it again`
    await db.update(tables.clips).set({ status: 'failed', failReason: reason, multipartId: null }).where(eq(tables.clips.id, clip.id))
    setResponseStatus(event, 422)
    return { ok: false, reason }
  }
  const result = await acceptStoredClip(clip)
  if (!result.ok) {
    setResponseStatus(event, result.status)
    return { ok: false, reason: result.reason }
  }
  setResponseStatus(event, 201)
  return { ok: true, clip: clipView(result.clip) }
})
