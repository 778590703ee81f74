// The analyse processor as BullMQ runs it in a worker thread (sandboxed processor). The
// engine is synchronous JS, so one thread measures one frame at a time: a thread per job
// is what lets one worker process use every core. Each thread keeps its own MariaDB pool
// and S3 client, made on its first job, because nothing of that kind crosses threads.
import type { SandboxedJob } from 'bullmq'
import { createDb } from '../server/db/client'
import { Storage, storageConfigFromEnv } from '../server/lib/storage'
import type { AnalyseJob } from '../shared/utils/queues'
import { processAnalyse, type AnalyseDeps } from './analyse-frame'
import { configureSharp } from './lib/frame-images'

configureSharp()

let deps: AnalyseDeps | undefined

export default async function analyseInThread(job: SandboxedJob<AnalyseJob>) {
  if (!deps) {
    const url = process.env.NUXT_DATABASE_URL
    if (!url) throw new Error('NUXT_DATABASE_URL is not set')
    // One job at a time per thread, plus one for the idempotency check racing a retry.
    deps = { db: createDb(url, 2).db, storage: new Storage(storageConfigFromEnv()) }
  }
  return processAnalyse(job, deps)
}
