// Entry point of the worker process: wires the plain processors to BullMQ workers.
// It never serves HTTP; run as many as you like against the same Redis, S3 and MariaDB.
import { availableParallelism } from 'node:os'
import { Queue, Worker } from 'bullmq'
import { Redis } from 'ioredis'
import nodemailer from 'nodemailer'
import { createDb } from '../server/db/client'
import { Storage, storageConfigFromEnv } from '../server/lib/storage'
import { DEFAULT_JOB_OPTIONS, QUEUE_ANALYSE, QUEUE_MAIL, type AnalyseJob, type MailJob } from '../shared/utils/queues'
import { processAnalyse } from './analyse-frame'
import { workerEnv } from './env'
import { processMail } from './mail'
import { startSheetWorker } from './sheet-worker'
import { sweep } from './sweeper'

const env = workerEnv()
const concurrency = env.concurrency ?? availableParallelism()
const connection = new Redis(env.redisUrl, { maxRetriesPerRequest: null })
connection.on('error', (e) => console.error('[worker] redis', e.message))
const transport = nodemailer.createTransport(env.smtpUrl)
const { db, pool } = createDb(env.databaseUrl, concurrency + 2)
const storage = new Storage(storageConfigFromEnv())
const analyseQueue = new Queue<AnalyseJob>(QUEUE_ANALYSE, { connection, defaultJobOptions: DEFAULT_JOB_OPTIONS })
analyseQueue.on('error', (e) => console.error('[worker] queue', e.message))

const sheets = startSheetWorker(connection, env.databaseUrl)
const workers = [
  new Worker<MailJob>(QUEUE_MAIL, (job) => processMail(job, transport, env.mailFrom), { connection, concurrency: 4 }),
  sheets.worker,
  new Worker<AnalyseJob>(QUEUE_ANALYSE, (job) => processAnalyse(job, { db, storage }), { connection, concurrency }),
]
for (const w of workers) {
  w.on('error', (e) => console.error(`[worker ${w.name}]`, e.message))
  w.on('failed', (job, e) => console.error(`[worker ${w.name}] job ${job?.id} failed (attempt ${job?.attemptsMade}):`, e.message))
}

const sweepTimer = setInterval(() => {
  sweep(db, analyseQueue).then((n) => { if (n) console.log(`[worker] re-queued ${n} frame(s)`) })
    .catch((e) => console.error('[worker] sweep', (e as Error).message))
}, 10_000)
console.log(`[worker] ready: analyse ×${concurrency}, mail ×4, sheet ×1`)

let closing = false
async function shutdown(signal: string) {
  if (closing) return
  closing = true
  console.log(`[worker] ${signal}: finishing current jobs`)
  clearInterval(sweepTimer)
  await Promise.all(workers.map((w) => w.close()))
  await analyseQueue.close()
  transport.close()
  await pool.end()
  await sheets.pool.end()
  await connection.quit().catch(() => {})
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown('SIGTERM'))
process.on('SIGINT', () => void shutdown('SIGINT'))
