// Turning a checked object into a frame: one transaction that either creates the frame
// (status `queued`, the outbox the worker's sweeper also reads) or finds the same content
// already in the reel.
import { createHash } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import type { Queue } from 'bullmq'
import { firstId, type Db } from '../db/client'
import * as t from '../db/schema'
import { analyseJobId, type AnalyseJob } from '../../shared/utils/queues'
import { FRAME_RATES, labelAtRate, timecodeFromFileName, type FrameRateName } from '../../shared/utils/timecode'
import { IntakeError, type Inspected } from './intake'
import { keys, type Storage } from './storage'

const QUEUE_TIMEOUT_MS = 10_000

export const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex')

export interface NewFrame {
  teamId: number
  reelId: number
  name: string
  bytes: Uint8Array
  inspected: Inspected
  uploadedBy: number | null
  /** Already in S3 (a presigned upload): used as it is instead of storing a copy. */
  storedAt?: string
  /** SHA-256 of `bytes` (hex) when the caller hashed them as they arrived. */
  sha256?: string
}

export type FrameRow = typeof t.frames.$inferSelect

/**
 * Stores the original under a content-addressed key and creates the frame. Returns the
 * existing frame (duplicate: true) when the same bytes are already in this reel.
 */
export async function createFrame(db: Db, storage: Storage, f: NewFrame): Promise<{ frame: FrameRow; duplicate: boolean }> {
  const hash = f.sha256 ?? sha256(f.bytes)
  const [existing] = await db.select().from(t.frames).where(and(eq(t.frames.reelId, f.reelId), eq(t.frames.sha256, hash))).limit(1)
  if (existing) return { frame: existing, duplicate: true }
  const objectKey = f.storedAt ?? keys.original(f.teamId, f.reelId, hash)
  // The object goes first: a frame row never points at bytes that are not there.
  if (!f.storedAt) await storage.put(objectKey, f.bytes, contentTypeOf(f.inspected.format), hash)
  return db.transaction(async (tx) => {
    const [reel] = await tx.select({ nextSeq: t.reels.nextSeq, signedAt: t.reels.signedAt, frameRate: t.reels.frameRate, dropFrame: t.reels.dropFrame }).from(t.reels).where(eq(t.reels.id, f.reelId)).for('update')
    if (!reel) throw new Error('reel vanished during upload')
    // Checked again under the lock: a sign-off may have landed since the route's first check.
    if (reel.signedAt) throw new IntakeError(409, 'The reel was signed off while this file was arriving; an owner can reopen it')
    const [again] = await tx.select().from(t.frames).where(and(eq(t.frames.reelId, f.reelId), eq(t.frames.sha256, hash))).limit(1)
    if (again) return { frame: again, duplicate: true }
    await tx.update(t.reels).set({ nextSeq: sql`${t.reels.nextSeq} + 1` }).where(eq(t.reels.id, f.reelId))
    const id = firstId(await tx.insert(t.frames).values({
      teamId: f.teamId, reelId: f.reelId, seq: reel.nextSeq, name: f.name, timecode: frameTimecode(f, reel), objectKey, sha256: hash, bytes: f.bytes.length,
      format: f.inspected.format, width: f.inspected.width, height: f.inspected.height, status: 'queued', queuedAt: new Date(), uploadedBy: f.uploadedBy,
    }).$returningId())
    const [frame] = await tx.select().from(t.frames).where(eq(t.frames.id, id))
    return { frame: frame!, duplicate: false }
  })
}

/** The frame's timecode: from the file's metadata, else from its name, labelled at the reel's rate. */
export function frameTimecode(f: Pick<NewFrame, 'name' | 'inspected'>, reel: { frameRate: FrameRateName | null; dropFrame: boolean }): string | null {
  const tc = f.inspected.timecode ?? timecodeFromFileName(f.name)
  return tc ? labelAtRate(tc, reel.frameRate ? FRAME_RATES[reel.frameRate] : null, reel.dropFrame) : null
}

/**
 * Hands a frame to the queue. If Redis is down the frame stays `queued` in MariaDB and the
 * worker's sweeper queues it when Redis is back: it is never lost, only late.
 */
export async function queueFrame(queue: Queue<AnalyseJob>, frameId: number): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined
  try {
    // BullMQ waits for a first connection that never comes when Redis is down at start:
    // give up after a moment, the sweeper has the frame.
    const timeout = new Promise<never>((_, reject) => { timer = setTimeout(() => reject(new Error('queue did not answer within 10 s')), QUEUE_TIMEOUT_MS) })
    await Promise.race([queue.add('analyse', { frameId }, { jobId: analyseJobId(frameId) }), timeout])
    return true
  } catch (e) {
    console.error(`[queue] frame ${frameId} not queued yet: ${(e as Error).message}`)
    return false
  } finally {
    clearTimeout(timer)
  }
}

/**
 * Queues a frame to be measured again (its reel's matrix or range changed). Idempotent: a
 * job still waiting keeps its place (it reads the reel's settings when it starts), and a
 * finished job with the frame's id is removed first, since BullMQ would swallow the new add.
 * A job already running finds the settings changed before it writes and measures again.
 */
export async function requeueFrame(queue: Queue<AnalyseJob>, frameId: number): Promise<boolean> {
  try {
    const job = await queue.getJob(analyseJobId(frameId))
    const state = job ? await job.getState() : 'missing'
    if (state === 'waiting' || state === 'active' || state === 'delayed' || state === 'prioritized' || state === 'waiting-children') return true
    if (job) await job.remove().catch(() => {})
    return await queueFrame(queue, frameId)
  } catch (e) {
    // The frame is `queued` in MariaDB: the sweeper queues it once Redis answers.
    console.error(`[queue] frame ${frameId} not re-queued yet: ${(e as Error).message}`)
    return false
  }
}

export function contentTypeOf(format: string) {
  return ({ png: 'image/png', jpeg: 'image/jpeg', tiff: 'image/tiff', webp: 'image/webp' } as Record<string, string>)[format] ?? 'application/octet-stream'
}
