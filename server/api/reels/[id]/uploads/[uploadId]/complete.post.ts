import { and, eq, isNull, lt, or, sql } from 'drizzle-orm'
import { z } from 'zod'
import { IdSchema } from '../../../../../../shared/utils/validation'
import { CompleteUploadBody } from '../../../../../../shared/utils/uploads'

const Params = z.object({ id: IdSchema, uploadId: IdSchema })

/** A claim older than this is taken to be from a request that died; another may take over. */
const CLAIM_STALE_MS = 5 * 60_000
/** How long a repeat waits for the request that holds the claim to finish. */
const WAIT_MS = 60_000

type Upload = typeof tables.uploads.$inferSelect

/**
 * The browser says a file is in S3. The server checks the object itself (size against the
 * announcement, bytes, dimensions) before it becomes a frame and is queued.
 *
 * Idempotent under concurrency: one request claims the upload (a conditional UPDATE, so
 * only one wins); the others wait for it and give the same answer. The same upload
 * completed twice is the same frame, never a "duplicate" of itself, and an object is
 * deleted only when no frame row points at it.
 */
export default defineEventHandler(async (event) => {
  const { id, uploadId } = await getValidatedRouterParams(event, Params.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  const { parts } = await readValidatedBody(event, CompleteUploadBody.parse)
  const db = useDb()
  const find = async () => (await db.select().from(tables.uploads).where(and(eq(tables.uploads.id, uploadId), eq(tables.uploads.reelId, reel.id))).limit(1))[0]

  for (const until = Date.now() + WAIT_MS; ;) {
    const up = await find()
    if (!up) throw createError({ statusCode: 404, statusMessage: 'Not found' })
    if (up.completedAt) return answerDone(event, up)
    await assertReelOpen(reel.id)
    const staleBefore = new Date(Date.now() - CLAIM_STALE_MS)
    const [claim] = await db.update(tables.uploads).set({ claimedAt: sql`CURRENT_TIMESTAMP(3)` })
      .where(and(eq(tables.uploads.id, up.id), isNull(tables.uploads.completedAt), or(isNull(tables.uploads.claimedAt), lt(tables.uploads.claimedAt, staleBefore))))
    if ((claim as { affectedRows?: number }).affectedRows === 1) {
      try {
        return await complete(event, up, parts, { teamId: reel.teamId, reelId: reel.id, userId: user.id })
      } finally {
        // Finished or failed: a failed attempt may be retried at once.
        await db.update(tables.uploads).set({ claimedAt: null }).where(eq(tables.uploads.id, up.id)).catch(() => {})
      }
    }
    if (Date.now() > until) throw createError({ statusCode: 409, statusMessage: 'This upload is being checked by another request; ask again in a minute' })
    await new Promise((r) => setTimeout(r, 100))
  }
})

type H3Event = Parameters<Parameters<typeof defineEventHandler>[0]>[0]

/** The answer for an upload already completed: its frame, or the reason it was refused. */
async function answerDone(event: H3Event, up: Upload) {
  if (up.frameId) {
    setResponseStatus(event, 200)
    return { name: up.name, ok: true, frameId: up.frameId, duplicate: false, queued: true }
  }
  throw createError({ statusCode: 404, statusMessage: 'Not found' })
}

async function complete(event: H3Event, up: Upload, parts: { partNumber: number; etag: string }[] | undefined, ctx: { teamId: number; reelId: number; userId: number }) {
  const db = useDb()
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
    await deleteUnreferenced(up.objectKey)
    await db.update(tables.uploads).set({ completedAt: new Date() }).where(eq(tables.uploads.id, up.id))
    setResponseStatus(event, status)
    return { name: up.name, ok: false, status, reason }
  }
  if (size !== up.bytes) return refuse(422, `The stored file has ${size} bytes, ${up.bytes} were announced; send it again`)
  const bytes = await storage.get(up.objectKey)
  const result = await intakeFile({
    teamId: ctx.teamId, reelId: ctx.reelId, userId: ctx.userId, name: up.name, bytes, format: up.format,
    rawWidth: up.rawWidth, rawHeight: up.rawHeight, storedAt: up.objectKey,
  })
  if (!result.ok) return refuse(result.status ?? 422, result.reason ?? 'Refused')
  // A frame made from this very object (an earlier attempt that died before recording it) is this upload's frame, not a duplicate.
  const [frame] = await db.select({ objectKey: tables.frames.objectKey }).from(tables.frames).where(eq(tables.frames.id, result.frameId!)).limit(1)
  const self = frame?.objectKey === up.objectKey
  await db.update(tables.uploads).set({ completedAt: new Date(), frameId: result.frameId }).where(eq(tables.uploads.id, up.id))
  // Another upload of the same bytes keeps its copy; this one is not needed unless a frame points at it.
  if (result.duplicate && !self) await deleteUnreferenced(up.objectKey)
  const duplicate = !!result.duplicate && !self
  setResponseStatus(event, duplicate ? 200 : 201)
  return { ...result, duplicate }
}

/** Deletes a stored object only when no frame row points at it (one indexed lookup). */
async function deleteUnreferenced(key: string) {
  const [used] = await useDb().select({ id: tables.frames.id }).from(tables.frames).where(eq(tables.frames.objectKey, key)).limit(1)
  if (!used) await useStorageS3().delete(key).catch(() => {})
}
