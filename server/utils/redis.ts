import { Redis } from 'ioredis'
import { Queue } from 'bullmq'
import { DEFAULT_JOB_OPTIONS } from '../../shared/utils/queues'

let client: Redis | undefined
const queues = new Map<string, Queue>()

/**
 * Redis for requests: fails fast (no offline queue, one retry) so that a route can answer
 * 503 at once when Redis is down instead of hanging the request.
 */
export function useRedis(): Redis {
  if (!client) {
    client = new Redis(useRuntimeConfig().redisUrl, { enableOfflineQueue: false, maxRetriesPerRequest: 1, lazyConnect: false })
    client.on('error', (e) => console.error('[redis]', e.message))
  }
  return client
}

export function useQueue(name: string): Queue {
  let q = queues.get(name)
  if (!q) {
    q = new Queue(name, { connection: useRedis(), defaultJobOptions: DEFAULT_JOB_OPTIONS })
    q.on('error', (e) => console.error(`[queue ${name}]`, e.message))
    queues.set(name, q)
  }
  return q
}

/** Adds a job or answers 503: a job is never silently dropped. */
export async function enqueue<T>(queue: string, name: string, data: T, opts: Record<string, unknown> = {}) {
  let timer: NodeJS.Timeout | undefined
  try {
    // A queue whose first connection never came would wait for ever: answer 503 instead.
    const timeout = new Promise<never>((_, reject) => { timer = setTimeout(() => reject(new Error('no answer within 10 s')), 10_000) })
    return await Promise.race([useQueue(queue).add(name, data, opts), timeout])
  } catch (e) {
    console.error(`[queue ${queue}] add failed`, (e as Error).message)
    throw createError({ statusCode: 503, statusMessage: 'The job queue is unavailable; nothing was saved. Try again in a minute.' })
  } finally {
    clearTimeout(timer)
  }
}
