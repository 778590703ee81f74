// Entry point of the worker process: wires the plain processors to BullMQ workers.
// It never serves HTTP; run as many as you like against the same Redis, S3 and MariaDB.
// Analysis runs in BullMQ's sandbox on worker threads (analyse-sandbox.ts): the engine is
// synchronous, so in-process concurrency would still use a single core, and a busy event
// loop here would also delay the lock renewals that tell BullMQ this worker is alive.
import { availableParallelism } from 'node:os'
import { Queue, Worker } from 'bullmq'
import { Redis } from 'ioredis'
import nodemailer from 'nodemailer'
import { createDb } from '../server/db/client'
import { DEFAULT_JOB_OPTIONS, QUEUE_ANALYSE, QUEUE_MAIL, type AnalyseJob, type MailJob } from '../shared/utils/queues'
import { workerEnv } from './env'
import { processMail } from './mail'
import { startSheetWorker } from './sheet-worker'
import { msFromEnv, queueMissingViews, sweep, SWEEP } from './sweeper'
import { startClipWorkers } from './clips/wire'

const env = workerEnv()
const concurrency = env.concurrency ?? availableParallelism()
const connection = new Redis(env.redisUrl, { maxRetriesPerRequest: null })
connection.on('error', (e) => console.error('[worker] redis', e.message))
const transport = nodemailer.createTransport(env.smtpUrl)
// Only the sweeper queries from this thread; the analysis threads have pools of their own.
const { db, pool } = createDb(env.databaseUrl, 2)
// A job whose worker died is handed out again once its lock runs out and the stall check
// sees it (BullMQ's defaults, 30 s each); fault tests shorten both through the environment.
const lockDuration = msFromEnv('LW_LOCK_DURATION_MS', 30_000)
const stalledInterval = msFromEnv('LW_STALLED_INTERVAL_MS', 30_000)
const analyseQueue = new Queue<AnalyseJob>(QUEUE_ANALYSE, { connection, defaultJobOptions: DEFAULT_JOB_OPTIONS })
analyseQueue.on('error', (e) => console.error('[worker] queue', e.message))

const sheets = startSheetWorker(connection, env.databaseUrl)
const workers: Worker[] = [
  new Worker<MailJob>(QUEUE_MAIL, (job) => processMail(job, transport, env.mailFrom), { connection, concurrency: 4 }),
  sheets.worker,
  new Worker<AnalyseJob>(QUEUE_ANALYSE, new URL('./analyse-sandbox.mjs', import.meta.url), {
    connection, concurrency, lockDuration, stalledInterval, useWorkerThreads: true,
  }),
]
const clips = startClipWorkers(connection, db, { lockDuration, stalledInterval, sweepMs: SWEEP.queuedAfterMs })
workers.push(...clips.workers)
for (const w of workers) {
  w.on('error', (e) => console.error(`[worker ${w.name}]`, e.message))
  w.on('failed', (job, e) => console.error(`[worker ${w.name}] job ${job?.id} failed (attempt ${job?.attemptsMade}):`, e.message))
}

const sweepTimer = setInterval(() => {
  sweep(db, analyseQueue).then((n) => { if (n) console.log(`[worker] re-queued ${n} frame(s)`) })
    .catch((e) => console.error('[worker] sweep', (e as Error).message))
}, SWEEP.intervalMs)
queueMissingViews(db, analyseQueue).then((n) => { if (n) console.log(`[worker] queued ${n} frame(s) for their viewing copy and line data`) })
  .catch((e) => console.error('[worker] views backfill', (e as Error).message))
console.log(`[worker] ready: analyse ×${concurrency}, mail ×4, sheet ×1`)

let closing = false
async function shutdown(signal: string) {
  if (closing) return
  closing = true
  console.log(`[worker] ${signal}: finishing current jobs`)
  clearInterval(sweepTimer)
  await Promise.all(workers.map((w) => w.close()))
  await clips.close()
  await analyseQueue.close()
  transport.close()
  await pool.end()
  await sheets.pool.end()
  await connection.quit().catch(() => {})
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown('SIGTERM'))
process.on('SIGINT', () => void shutdown('SIGINT'))
