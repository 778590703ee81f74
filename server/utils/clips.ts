import type { H3Event } from 'h3'
import { and, eq, sql } from 'drizzle-orm'
import type { Permission } from '../../shared/utils/roles'
import { QUEUE_CLIP, clipProbeJobId, type ClipJob } from '../../shared/utils/clips'
import type { ClipRow } from '../../shared/types/db'
import { ClipRefusal, probeClip, type ClipProbe } from '../lib/clips/probe'
import { presignGet } from '../lib/clips/keys'

/** A clip the user can reach with the permission: another team's clip answers 404, as a missing one. */
export async function requireClip(event: H3Event, clipId: number, permission: Permission) {
  const user = await requireUser(event)
  const [found] = await useDb().select({ clip: tables.clips, role: tables.memberships.role }).from(tables.clips)
    .innerJoin(tables.memberships, and(eq(tables.memberships.teamId, tables.clips.teamId), eq(tables.memberships.userId, user.id)))
    .where(eq(tables.clips.id, clipId)).limit(1)
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  assertCan(found.role, permission)
  return { user, role: found.role, clip: found.clip }
}

/**
 * A stored clip object: probed at once (so a file that cannot be measured is refused while
 * the person waits, with the reason), then `queued` and handed to the clip queue. Returns
 * the refusal, after deleting the object, or the queued clip.
 */
export async function acceptStoredClip(clip: ClipRow): Promise<{ ok: true, clip: ClipRow } | { ok: false, status: number, reason: string }> {
  const db = useDb()
  const storage = useStorageS3()
  let probe: ClipProbe
  try {
    probe = await probeClip(await presignGet(storage, clip.objectKey, 600), clip.bytes)
  } catch (e) {
    if (!(e instanceof ClipRefusal)) throw e
    await storage.delete(clip.objectKey).catch(() => {})
    await db.update(tables.clips).set({ status: 'failed', failReason: e.message.slice(0, 480), multipartId: null }).where(eq(tables.clips.id, clip.id))
    return { ok: false, status: 422, reason: e.message }
  }
  await db.update(tables.clips).set({
    status: 'queued', queuedAt: new Date(), multipartId: null, probe, width: probe.width, height: probe.height,
    fpsNum: probe.rate.num, fpsDen: probe.rate.den, dropFrame: probe.dropFrame, frameCount: probe.frameCount,
    startTimecode: probe.startTimecode, startTimecodeFound: probe.startTimecodeFound,
  }).where(and(eq(tables.clips.id, clip.id), eq(tables.clips.status, 'uploading')))
  // If Redis is down the clip stays `queued` and the worker's sweep queues it later.
  await enqueue<ClipJob>(QUEUE_CLIP, 'probe', { kind: 'probe', clipId: clip.id }, { jobId: clipProbeJobId(clip.id) }).catch(() => {})
  const [row] = await db.select().from(tables.clips).where(eq(tables.clips.id, clip.id)).limit(1)
  return { ok: true, clip: row! }
}

/** Progress of a clip being measured: share done, frames per second, seconds left. */
export async function clipProgress(clip: ClipRow) {
  if (clip.status !== 'measuring' && clip.status !== 'merging') return null
  const [row] = await useDb().select({ done: sql<string>`coalesce(sum(${tables.clipChunks.framesDone}), 0)` }).from(tables.clipChunks)
    .where(eq(tables.clipChunks.clipId, clip.id))
  const done = Number(row?.done ?? 0)
  const total = clip.frameCount ?? 0
  const seconds = clip.measureStartedAt ? (Date.now() - clip.measureStartedAt.getTime()) / 1000 : 0
  const fps = seconds > 0 ? done / seconds : 0
  return { framesDone: done, frameCount: total, percent: total ? Math.min(100, (100 * done) / total) : 0, fps, secondsLeft: fps > 0 ? Math.max(0, (total - done) / fps) : null }
}

/** What the API shows of a clip (no object keys). */
export function clipView(c: ClipRow) {
  const p = c.probe as ClipProbe | null
  return {
    id: c.id, reelId: c.reelId, name: c.name, bytes: c.bytes, status: c.status, failReason: c.failReason,
    width: c.width, height: c.height, fps: c.fpsNum && c.fpsDen ? c.fpsNum / c.fpsDen : null, fpsNum: c.fpsNum, fpsDen: c.fpsDen,
    dropFrame: c.dropFrame, startTimecode: c.startTimecode, startTimecodeFound: c.startTimecodeFound,
    frameCount: c.frameCount, framesMeasured: c.framesMeasured, truncated: c.truncated, note: c.note,
    durationS: c.fpsNum && (c.framesMeasured ?? c.frameCount) ? ((c.framesMeasured ?? c.frameCount)! * c.fpsDen!) / c.fpsNum : null,
    codec: p?.codec ?? null, container: p?.container ?? null, pixFmt: p?.pixFmt ?? null, bitDepth: p?.bitDepth ?? null,
    matrixTag: p?.matrixTag ?? null, rangeTag: p?.rangeTag ?? null, fieldOrder: p?.fieldOrder ?? null,
    specName: c.specName, specVersion: c.specVersion, engineVersion: c.engineVersion, createdAt: c.createdAt, measuredAt: c.measuredAt,
  }
}
