// The outbox side of "nothing lost": frames whose job went missing (Redis restarted or was
// down at upload, a worker died beyond BullMQ's stall recovery) are queued again. The job id
// is the frame's, so a frame that still has a live job is left alone.
import { and, eq, lt, or, sql } from 'drizzle-orm'
import type { Queue } from 'bullmq'
import type { Db } from '../server/db/client'
import * as t from '../server/db/schema'
import { analyseJobId, type AnalyseJob } from '../shared/utils/queues'

/** A whole number of milliseconds from the environment, else the production default. */
export function msFromEnv(name: string, fallback: number): number {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const v = Number(raw)
  if (!Number.isInteger(v) || v <= 0) throw new Error(`${name} must be a positive whole number of milliseconds (got "${raw}")`)
  return v
}

// Fault tests shorten these through the environment; production keeps the defaults.
export const SWEEP = {
  /** How often the worker looks for frames to queue again. */
  intervalMs: msFromEnv('LW_SWEEP_INTERVAL_MS', 10_000),
  /** A `queued` frame older than this without a waiting job is queued again. */
  queuedAfterMs: msFromEnv('LW_SWEEP_QUEUED_AFTER_MS', 20_000),
  /** An `analysing` frame untouched this long has lost its worker. */
  analysingAfterMs: msFromEnv('LW_SWEEP_ANALYSING_AFTER_MS', 5 * 60_000),
  batch: 500,
}

export async function sweep(db: Db, queue: Queue<AnalyseJob>, now = Date.now()): Promise<number> {
  const stale = await db.select({ id: t.frames.id }).from(t.frames).where(or(
    and(eq(t.frames.status, 'queued'), lt(t.frames.queuedAt, new Date(now - SWEEP.queuedAfterMs))),
    and(eq(t.frames.status, 'analysing'), lt(t.frames.updatedAt, new Date(now - SWEEP.analysingAfterMs))),
  )).limit(SWEEP.batch)
  let requeued = 0
  for (const { id } of stale) {
    const job = await queue.getJob(analyseJobId(id))
    const state = job ? await job.getState() : 'missing'
    if (state === 'waiting' || state === 'active' || state === 'delayed' || state === 'prioritized' || state === 'waiting-children') continue
    // A finished job with this id would swallow the new add: remove it first.
    if (job) await job.remove().catch(() => {})
    await queue.add('analyse', { frameId: id }, { jobId: analyseJobId(id) })
    await db.update(t.frames).set({ status: 'queued', queuedAt: new Date() }).where(eq(t.frames.id, id))
    requeued++
  }
  return requeued
}

/**
 * Frames analysed before the worker stored a viewing copy and line data (the web server
 * serves only what the worker stored) get a job that makes them: the job finds the analysis,
 * keeps it, and writes the missing views. Run once when the worker starts; idempotent.
 */
export async function queueMissingViews(db: Db, queue: Queue<AnalyseJob>): Promise<number> {
  const rows = await db.select({ id: t.analyses.frameId }).from(t.analyses)
    .where(sql`NOT JSON_CONTAINS(${t.analyses.images}, '"picture"')`)
  for (const { id } of rows) {
    const job = await queue.getJob(analyseJobId(id))
    const state = job ? await job.getState() : 'missing'
    if (state === 'waiting' || state === 'active' || state === 'delayed' || state === 'prioritized') continue
    if (job) await job.remove().catch(() => {})
    await queue.add('analyse', { frameId: id }, { jobId: analyseJobId(id) })
  }
  return rows.length
}
