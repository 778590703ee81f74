// Wires the clip processors to BullMQ for the worker process: the clip queue (probe, merge,
// extract) and the chunk queue. A chunk's frames are measured on engine threads
// (measure-thread.ts, LW_CLIP_ENGINE_THREADS, default one per core but one left to ffmpeg's
// decoding; on two cores that is the calling thread alone); this thread only reads
// the pipe and awaits, so lock renewals get their turn while a chunk is measured.
import { FlowProducer, Queue, Worker } from 'bullmq'
import type { Redis } from 'ioredis'
import type { Db } from '../../server/db/client'
import { Storage, storageConfigFromEnv } from '../../server/lib/storage'
import { DEFAULT_JOB_OPTIONS, QUEUE_ANALYSE, type AnalyseJob } from '../../shared/utils/queues'
import { QUEUE_CLIP, QUEUE_CLIP_CHUNK, type ClipChunkJob, type ClipJob } from '../../shared/utils/clips'
import { processClipChunk, processClipJob, sweepClips, type ClipDeps } from './process'
import { defaultEngineThreads } from './measure'

function intFromEnv(name: string): number | undefined {
  const raw = process.env[name]
  if (!raw) return undefined
  const v = Number(raw)
  if (!Number.isInteger(v) || v <= 0) throw new Error(`${name} must be a positive whole number (got "${raw}")`)
  return v
}

export function startClipWorkers(connection: Redis, db: Db, opts: { lockDuration: number, stalledInterval: number, sweepMs: number }) {
  const analyseQueue = new Queue<AnalyseJob>(QUEUE_ANALYSE, { connection, defaultJobOptions: DEFAULT_JOB_OPTIONS })
  const clipQueue = new Queue<ClipJob>(QUEUE_CLIP, { connection, defaultJobOptions: DEFAULT_JOB_OPTIONS })
  const flow = new FlowProducer({ connection })
  for (const q of [analyseQueue, clipQueue]) q.on('error', (e) => console.error('[worker] clip queue', e.message))
  flow.on('error', (e) => console.error('[worker] flow', e.message))
  const deps: ClipDeps = {
    db, storage: new Storage(storageConfigFromEnv()), analyseQueue, flow,
    chunkFrames: intFromEnv('LW_CLIP_CHUNK_FRAMES'), decodeThreads: intFromEnv('LW_CLIP_DECODE_THREADS'),
    engineThreads: intFromEnv('LW_CLIP_ENGINE_THREADS') ?? defaultEngineThreads(),
  }
  const workers = [
    new Worker<ClipJob>(QUEUE_CLIP, (job) => processClipJob(job, deps), { connection, concurrency: 2, lockDuration: opts.lockDuration, stalledInterval: opts.stalledInterval }),
    new Worker<ClipChunkJob>(QUEUE_CLIP_CHUNK, (job) => processClipChunk(job, deps), {
      connection, concurrency: intFromEnv('LW_CLIP_CHUNK_CONCURRENCY') ?? 1, lockDuration: opts.lockDuration, stalledInterval: opts.stalledInterval,
    }),
  ]
  const timer = setInterval(() => {
    sweepClips(db, clipQueue, opts.sweepMs).then((n) => { if (n) console.log(`[worker] re-queued ${n} clip(s)`) })
      .catch((e) => console.error('[worker] clip sweep', (e as Error).message))
  }, opts.sweepMs)
  return {
    workers,
    async close() {
      clearInterval(timer)
      await Promise.all(workers.map((w) => w.close()))
      await Promise.all([analyseQueue.close(), clipQueue.close(), flow.close()])
    },
  }
}
