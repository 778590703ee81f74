// Entry point of the worker process: wires the plain processors to BullMQ workers.
// It never serves HTTP; run as many as you like against the same Redis, S3 and MariaDB.
import { availableParallelism } from 'node:os'
import { Worker } from 'bullmq'
import { Redis } from 'ioredis'
import nodemailer from 'nodemailer'
import { QUEUE_MAIL, type MailJob } from '../shared/utils/queues'
import { workerEnv } from './env'
import { processMail } from './mail'

const env = workerEnv()
const connection = new Redis(env.redisUrl, { maxRetriesPerRequest: null })
connection.on('error', (e) => console.error('[worker] redis', e.message))
const transport = nodemailer.createTransport(env.smtpUrl)

const workers = [
  new Worker<MailJob>(QUEUE_MAIL, (job) => processMail(job, transport, env.mailFrom), { connection, concurrency: 4 }),
]
for (const w of workers) {
  w.on('error', (e) => console.error(`[worker ${w.name}]`, e.message))
  w.on('failed', (job, e) => console.error(`[worker ${w.name}] job ${job?.id} failed (attempt ${job?.attemptsMade}):`, e.message))
}
console.log(`[worker] ready (cores ${availableParallelism()}), queues: ${workers.map((w) => w.name).join(', ')}`)

let closing = false
async function shutdown(signal: string) {
  if (closing) return
  closing = true
  console.log(`[worker] ${signal}: finishing current jobs`)
  await Promise.all(workers.map((w) => w.close()))
  transport.close()
  await connection.quit().catch(() => {})
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown('SIGTERM'))
process.on('SIGINT', () => void shutdown('SIGINT'))
