// One frame of a clip kept as a frame of the reel: ffmpeg extracts it (Y'CbCr as 10-bit
// v210, so nothing goes through R'G'B'; R'G'B' sources as a 16-bit PNG) and the still
// pipeline does the rest: the original in S3, a `queued` frame, the analyse job (scopes,
// line plot, range overlay, verdict, decisions, sheet).
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { and, eq } from 'drizzle-orm'
import type { Queue } from 'bullmq'
import type { Db } from '../../server/db/client'
import * as t from '../../server/db/schema'
import { contentTypeOf, createFrame, queueFrame } from '../../server/lib/frames'
import { keys, type Storage } from '../../server/lib/storage'
import type { AnalyseJob } from '../../shared/utils/queues'
import { framesToTimecode, timecodeToFrames } from '../../shared/utils/timecode'
import { presignGet } from '../../server/lib/clips/keys'
import { decodePlan } from './measure'
import type { ClipProbe } from '../../server/lib/clips/probe'

const FFMPEG = process.env.FFMPEG ?? 'ffmpeg'

type ClipRow = typeof t.clips.$inferSelect

export function clipTimecode(clip: Pick<ClipRow, 'startTimecode' | 'fpsNum' | 'fpsDen' | 'dropFrame'>, frame: number): string {
  const rate = { num: clip.fpsNum!, den: clip.fpsDen! }
  const start = timecodeToFrames(clip.startTimecode ?? '00:00:00:00', rate, clip.dropFrame)
  return framesToTimecode(frame, rate, clip.dropFrame, start)
}

/** The bytes of frame `n` (0-based) of the clip, as the frame format the still pipeline reads. */
export function extractFrame(input: string, probe: ClipProbe, n: number): Promise<{ bytes: Buffer, format: 'v210' | 'png' }> {
  const rgb = probe.chroma === 'rgb'
  const args = ['-hide_banner', '-v', 'error', '-nostdin', '-threads', '1']
  if (n > 0) args.push('-ss', ((n - 0.5) * probe.rate.den / probe.rate.num).toFixed(6))
  args.push('-i', input, '-map', '0:v:0', '-an', '-sn', '-dn', '-frames:v', '1', '-fps_mode', 'passthrough')
  const filters = decodePlan(probe, 'full').filters
  if (filters.length) args.push('-vf', filters.join(','))
  if (rgb) args.push('-c:v', 'png', '-pix_fmt', probe.bitDepth > 8 ? 'rgb48be' : 'rgb24', '-f', 'image2pipe', 'pipe:1')
  else args.push('-c:v', 'v210', '-f', 'rawvideo', 'pipe:1')
  return new Promise((resolve, reject) => {
    const proc = spawn(FFMPEG, args, { stdio: ['ignore', 'pipe', 'pipe'] })
    const out: Buffer[] = []
    let err = ''
    proc.stdout.on('data', (d: Buffer) => out.push(d))
    proc.stderr.on('data', (d: Buffer) => { err += d.toString('utf8') })
    proc.on('error', reject)
    proc.on('close', (code) => {
      const bytes = Buffer.concat(out)
      if (code !== 0 || !bytes.length) reject(new Error(`frame ${n} could not be extracted: ${err.trim().split('\n').pop() ?? `exit ${code}`}`))
      else resolve({ bytes, format: rgb ? 'png' : 'v210' })
    })
  })
}

export interface KeepDeps {
  db: Db
  storage: Storage
  analyseQueue: Queue<AnalyseJob>
}

/** Keeps frame `n` of the clip (once: a second call finds it) and returns its frame id. */
export async function keepClipFrame(deps: KeepDeps, clip: ClipRow, n: number, kind: 'event' | 'filmstrip' | 'asked', url?: string): Promise<number> {
  const { db, storage } = deps
  const [kept] = await db.select({ frameId: t.clipFrames.frameId }).from(t.clipFrames)
    .where(and(eq(t.clipFrames.clipId, clip.id), eq(t.clipFrames.frameNumber, n))).limit(1)
  if (kept) return kept.frameId
  const probe = clip.probe as ClipProbe
  const { bytes, format } = await extractFrame(url ?? await presignGet(storage, clip.objectKey), probe, n)
  const tc = clipTimecode(clip, n)
  // Two frames of a clip with the same picture (black, a hold) are still two places in the
  // cut, each decided at its own timecode: the key that makes a frame unique in its reel is
  // the content's hash taken with the clip and frame number, not the pixels alone.
  const key = createHash('sha256').update(bytes).update(`clip:${clip.id}:${n}`).digest('hex')
  const storedAt = keys.original(clip.teamId, clip.reelId, key)
  await storage.put(storedAt, bytes, contentTypeOf(format))
  const { frame } = await createFrame(db, storage, {
    teamId: clip.teamId, reelId: clip.reelId, name: `${clip.name.slice(0, 200)} ${tc}`, bytes, sha256: key, storedAt,
    inspected: { format, width: probe.width, height: probe.height }, uploadedBy: clip.uploadedBy,
  })
  if (!frame.timecode) await db.update(t.frames).set({ timecode: tc }).where(eq(t.frames.id, frame.id))
  await db.insert(t.clipFrames).values({ clipId: clip.id, teamId: clip.teamId, frameNumber: n, frameId: frame.id, kind })
    .onDuplicateKeyUpdate({ set: { clipId: clip.id } })
  if (frame.status === 'queued') await queueFrame(deps.analyseQueue, frame.id)
  const [row] = await db.select({ frameId: t.clipFrames.frameId }).from(t.clipFrames)
    .where(and(eq(t.clipFrames.clipId, clip.id), eq(t.clipFrames.frameNumber, n))).limit(1)
  return row!.frameId
}
