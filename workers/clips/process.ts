// The clip processors, plain exported functions (workers/index.ts wires them to BullMQ):
// probe → a flow of chunk children under a merge parent → kept frames through the still
// pipeline. Every step is idempotent: a chunk measured once is never measured again (its
// row and its S3 part say so), a merge run twice writes the same events.
import { and, asc, eq, inArray, lt } from 'drizzle-orm'
import type { FlowJob, Queue } from 'bullmq'
import type { Db } from '../../server/db/client'
import * as t from '../../server/db/schema'
import type { Storage } from '../../server/lib/storage'
import { specForProduction } from '../../server/lib/specs'
import { ENGINE_VERSION } from '../../shared/engine'
import {
  CHUNK_SECONDS, CLIP_ACTIVE, FILMSTRIP_SECONDS, QUEUE_CLIP, QUEUE_CLIP_CHUNK, clipChunkJobId, clipMergeJobId, clipProbeJobId,
  planChunks, type ClipChunkJob, type ClipJob,
} from '../../shared/utils/clips'
import { copyTimeline, decodeTimeline, emptyTimeline, encodeTimeline, findEvents, sliceTimeline } from '../../shared/utils/clip-timeline'
import type { AnalyseJob } from '../../shared/utils/queues'
import { DEFAULT_JOB_OPTIONS } from '../../shared/utils/queues'
import { clipKeys, presignGet } from '../../server/lib/clips/keys'
import { clipTimecode, keepClipFrame } from './keep-frame'
import { measureFrames } from './measure'
import { ClipRefusal, probeClip, type ClipProbe } from '../../server/lib/clips/probe'

export interface ClipDeps {
  db: Db
  storage: Storage
  analyseQueue: Queue<AnalyseJob>
  /** BullMQ's FlowProducer (or a stand-in in tests). */
  flow: { add(flow: FlowJob): Promise<unknown> }
  /** Frames per chunk; default CHUNK_SECONDS of the clip's rate. */
  chunkFrames?: number
  decodeThreads?: number
  /** Engine threads per chunk (measureFrames' engineThreads); default 1. */
  engineThreads?: number
}

type ClipRow = typeof t.clips.$inferSelect

async function loadClip(db: Db, clipId: number): Promise<ClipRow | undefined> {
  const [clip] = await db.select().from(t.clips).where(eq(t.clips.id, clipId)).limit(1)
  return clip
}

async function failClip(db: Db, clipId: number, reason: string) {
  await db.update(t.clips).set({ status: 'failed', failReason: reason.slice(0, 480) })
    .where(and(eq(t.clips.id, clipId), inArray(t.clips.status, [...CLIP_ACTIVE])))
}

export async function processClipJob(job: { data: ClipJob }, deps: ClipDeps) {
  const d = job.data
  if (d.kind === 'probe') return processClipProbe(d.clipId, deps)
  if (d.kind === 'merge') return processClipMerge(d.clipId, deps)
  return processClipExtract(d.clipId, d.frame, deps)
}

/** Probes the clip and lays out its chunks as one BullMQ flow: chunk children, the merge parent. */
export async function processClipProbe(clipId: number, deps: ClipDeps) {
  const { db, storage } = deps
  const clip = await loadClip(db, clipId)
  if (!clip || (clip.status !== 'queued' && clip.status !== 'probing')) return { status: 'skipped' }
  // Every status change is conditional: a cancel that lands meanwhile is never overwritten.
  await db.update(t.clips).set({ status: 'probing' }).where(and(eq(t.clips.id, clipId), inArray(t.clips.status, ['queued', 'probing'])))
  let probe: ClipProbe
  try {
    probe = await probeClip(await presignGet(storage, clip.objectKey), clip.bytes)
  } catch (e) {
    if (e instanceof ClipRefusal) {
      await failClip(db, clipId, e.message)
      return { status: 'refused', reason: e.message }
    }
    throw e
  }
  const [reel] = await db.select().from(t.reels).where(eq(t.reels.id, clip.reelId)).limit(1)
  if (!reel) return { status: 'skipped' }
  const { spec, version } = await specForProduction(db, reel.productionId)
  const fps = probe.rate.num / probe.rate.den
  const chunks = planChunks(probe.frameCount, deps.chunkFrames ?? Math.round(CHUNK_SECONDS * fps))
  const planned = await db.transaction(async (tx) => {
    const [res] = await tx.update(t.clips).set({
      status: 'measuring', probe, width: probe.width, height: probe.height, fpsNum: probe.rate.num, fpsDen: probe.rate.den,
      dropFrame: probe.dropFrame, startTimecode: probe.startTimecode, startTimecodeFound: probe.startTimecodeFound,
      frameCount: probe.frameCount, specName: spec.name, specVersion: version, engineVersion: ENGINE_VERSION,
      measureStartedAt: new Date(),
    }).where(and(eq(t.clips.id, clipId), eq(t.clips.status, 'probing')))
    if (res.affectedRows !== 1) return false
    await tx.insert(t.clipChunks).values(chunks.map((c) => ({ clipId, teamId: clip.teamId, idx: c.index, startFrame: c.start, frameCount: c.count })))
      .onDuplicateKeyUpdate({ set: { clipId } })
    return true
  })
  if (!planned) return { status: 'skipped' }
  await deps.flow.add({
    name: 'merge', queueName: QUEUE_CLIP, data: { kind: 'merge', clipId } satisfies ClipJob,
    opts: { jobId: clipMergeJobId(clipId, 1), ...DEFAULT_JOB_OPTIONS },
    children: chunks.map((c) => ({
      name: 'chunk', queueName: QUEUE_CLIP_CHUNK, data: { clipId, index: c.index, start: c.start, count: c.count } satisfies ClipChunkJob,
      // A chunk that fails for good still lets the merge run, which then says which chunk and why.
      opts: { jobId: clipChunkJobId(clipId, 1, c.index), ...DEFAULT_JOB_OPTIONS, ignoreDependencyOnFailure: true },
    })),
  })
  return { status: 'planned', chunks: chunks.length }
}

/** Measures one chunk; a chunk already measured (a retry, a second worker) is left as it is. */
export async function processClipChunk(job: { data: ClipChunkJob }, deps: ClipDeps) {
  const { db, storage } = deps
  const { clipId, index } = job.data
  const clip = await loadClip(db, clipId)
  if (!clip || clip.status !== 'measuring') return { status: 'skipped' }
  const [chunk] = await db.select().from(t.clipChunks).where(and(eq(t.clipChunks.clipId, clipId), eq(t.clipChunks.idx, index))).limit(1)
  if (!chunk) return { status: 'skipped' }
  if (chunk.measured !== null) return { status: 'already measured' }
  const [reel] = await db.select().from(t.reels).where(eq(t.reels.id, clip.reelId)).limit(1)
  if (!reel) return { status: 'skipped' }
  const probe = clip.probe as ClipProbe
  const { spec } = await specForProduction(db, reel.productionId)
  const result = await measureFrames({
    input: await presignGet(storage, clip.objectKey), probe, start: chunk.startFrame, count: chunk.frameCount,
    matrix: probe.matrixTag ?? reel.matrix, rgbRange: reel.sourceRange, spec, threads: deps.decodeThreads,
    engineThreads: deps.engineThreads,
    onProgress: async (n) => {
      await db.update(t.clipChunks).set({ framesDone: n }).where(eq(t.clipChunks.id, chunk.id))
      const [now] = await db.select({ status: t.clips.status }).from(t.clips).where(eq(t.clips.id, clipId)).limit(1)
      return now?.status === 'measuring'
    },
  })
  if (result.cancelled) return { status: 'cancelled' }
  await storage.put(clipKeys.chunk(clip.teamId, clipId, index), encodeTimeline(result.timeline), 'application/octet-stream')
  await db.update(t.clipChunks).set({ measured: result.measured, framesDone: result.measured, error: result.error?.slice(0, 480) ?? null })
    .where(eq(t.clipChunks.id, chunk.id))
  return { status: 'measured', frames: result.measured }
}

/**
 * Joins the chunks' timelines in frame order, finds the events on the whole timeline (so an
 * event across a chunk boundary is one event), keeps the worst frame of each event and a
 * filmstrip frame every FILMSTRIP_SECONDS, and writes the events.
 */
export async function processClipMerge(clipId: number, deps: ClipDeps) {
  const { db, storage } = deps
  const clip = await loadClip(db, clipId)
  if (!clip || (clip.status !== 'measuring' && clip.status !== 'merging')) return { status: 'skipped' }
  const chunks = await db.select().from(t.clipChunks).where(eq(t.clipChunks.clipId, clipId)).orderBy(asc(t.clipChunks.idx))
  const lost = chunks.find((c) => c.measured === null)
  if (lost) {
    await failClip(db, clipId, `Frames ${lost.startFrame}–${lost.startFrame + lost.frameCount - 1} could not be measured${lost.error ? `: ${lost.error}` : ''}`)
    return { status: 'failed' }
  }
  await db.update(t.clips).set({ status: 'merging' }).where(and(eq(t.clips.id, clipId), eq(t.clips.status, 'measuring')))
  const probe = clip.probe as ClipProbe
  const whole = emptyTimeline(probe.frameCount)
  let total = 0
  let breakError: string | null = null
  for (const c of chunks) {
    const part = decodeTimeline(await storage.get(clipKeys.chunk(clip.teamId, clipId, c.idx)))
    copyTimeline(whole, part, c.startFrame)
    total = c.startFrame + part.frames
    if (part.frames < c.frameCount) { breakError = c.error; break }
  }
  // The probe's count is exact where the container states it and rounded from the duration
  // otherwise; a one-frame shortfall without a complaint from ffmpeg is that rounding.
  const truncated = total < probe.frameCount && (breakError !== null || total < probe.frameCount - 1)
  const timeline = total < probe.frameCount ? sliceTimeline(whole, total) : whole
  if (total === 0) {
    await failClip(db, clipId, `No frame could be decoded${breakError ? `: ${breakError}` : ''}`)
    return { status: 'failed' }
  }
  const [reel] = await db.select().from(t.reels).where(eq(t.reels.id, clip.reelId)).limit(1)
  if (!reel) return { status: 'skipped' }
  const { spec } = await specForProduction(db, reel.productionId)
  const events = findEvents(timeline, spec)
  const timelineKey = clipKeys.timeline(clip.teamId, clipId)
  await storage.put(timelineKey, encodeTimeline(timeline), 'application/octet-stream')
  const url = await presignGet(storage, clip.objectKey)
  const measuredClip = { ...clip, frameCount: total }
  const eventFrames: number[] = []
  for (const e of events) eventFrames.push(await keepClipFrame(deps, measuredClip, e.worstFrame, 'event', url))
  const fps = probe.rate.num / probe.rate.den
  const every = Math.max(Math.round(FILMSTRIP_SECONDS * fps), Math.ceil(total / 200))
  for (let n = 0; n < total; n += every) await keepClipFrame(deps, measuredClip, n, 'filmstrip', url)
  const note = truncated
    ? `The file breaks off after frame ${total - 1} (${clipTimecode(clip, total - 1)}); measured up to there, ${probe.frameCount - total} frame(s) of the announced length are missing${breakError ? `. ffmpeg: ${breakError}` : ''}`
    : null
  await db.transaction(async (tx) => {
    await tx.delete(t.clipEvents).where(eq(t.clipEvents.clipId, clipId))
    if (events.length) {
      await tx.insert(t.clipEvents).values(events.map((e, i) => ({
        clipId, teamId: clip.teamId, seq: i + 1, startFrame: e.start, endFrame: e.end,
        tcIn: clipTimecode(clip, e.start), tcOut: clipTimecode(clip, e.end), verdict: e.verdict, limits: e.limits,
        worstFrame: e.worstFrame, frameId: eventFrames[i]!,
      })))
    }
    await tx.update(t.clips).set({
      status: 'done', framesMeasured: total, truncated, note: note?.slice(0, 480) ?? null, timelineKey, measuredAt: new Date(), failReason: null,
    }).where(and(eq(t.clips.id, clipId), eq(t.clips.status, 'merging')))
  })
  return { status: 'done', frames: total, events: events.length }
}

/** A frame asked for from the timeline that was not kept: extracted now. */
export async function processClipExtract(clipId: number, frame: number, deps: ClipDeps) {
  const clip = await loadClip(deps.db, clipId)
  if (!clip || clip.status !== 'done' || frame >= (clip.framesMeasured ?? 0)) return { status: 'skipped' }
  const frameId = await keepClipFrame(deps, clip, frame, 'asked')
  return { status: 'kept', frameId }
}

/** Outbox: a clip stored and `queued` whose probe job went missing is queued again. */
export async function sweepClips(db: Db, queue: Queue<ClipJob>, olderThanMs: number, now = Date.now()): Promise<number> {
  const stale = await db.select({ id: t.clips.id }).from(t.clips)
    .where(and(eq(t.clips.status, 'queued'), lt(t.clips.queuedAt, new Date(now - olderThanMs)))).limit(100)
  let n = 0
  for (const { id } of stale) {
    const job = await queue.getJob(clipProbeJobId(id))
    const state = job ? await job.getState() : 'missing'
    if (state === 'waiting' || state === 'active' || state === 'delayed' || state === 'prioritized') continue
    if (job) await job.remove().catch(() => {})
    await queue.add('probe', { kind: 'probe', clipId: id }, { jobId: clipProbeJobId(id) })
    await db.update(t.clips).set({ queuedAt: new Date() }).where(eq(t.clips.id, id))
    n++
  }
  return n
}


