// Wiring of the sheet job, kept out of index.ts so the entry point gains only a line or two.
// One sheet at a time per process: a PDF with scope pages holds every image in memory.
import { Worker } from 'bullmq'
import type { Redis } from 'ioredis'
import { createDb } from '../server/db/client'
import { Storage, storageConfigFromEnv } from '../server/lib/storage'
import { QUEUE_SHEET, type SheetJob } from '../shared/utils/queues'
import { processSheet } from './sheet'

export function startSheetWorker(connection: Redis, databaseUrl: string) {
  const { db, pool } = createDb(databaseUrl, 2)
  const storage = new Storage(storageConfigFromEnv())
  const worker = new Worker<SheetJob>(QUEUE_SHEET, (job) => processSheet(job, { db, storage }), { connection, concurrency: 1 })
  return { worker, pool }
}
