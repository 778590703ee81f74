// Seeds the demo team, its users (one per role) and a production. Idempotent: running it
// again changes nothing that is already there (and never resets a changed password).
import { and, eq } from 'drizzle-orm'
import { hashPassword } from './password'
import { Queue } from 'bullmq'
import { Redis } from 'ioredis'
import { firstId, createDb, type Db } from '../db/client'
import { DEMO_REELS } from './demo-frames'
import { createFrame, queueFrame } from '../lib/frames'
import { inspectUpload } from '../lib/intake'
import { Storage, storageConfigFromEnv } from '../lib/storage'
import { DEFAULT_JOB_OPTIONS, QUEUE_ANALYSE, type AnalyseJob } from '../../shared/utils/queues'
import * as t from '../db/schema'
import { DEMO_PRODUCTION, DEMO_TEAM, DEMO_USERS } from './demo'
import { copyBuiltinSpecs } from '../lib/specs'

/**
 * The demo reels and their frames, put through the same path as an upload (checked, stored in
 * S3, a frame row, a queued job). Frames already there are recognised by content and skipped.
 */
async function seedFrames(db: Db, teamId: number, productionId: number, userId: number) {
  const storage = new Storage(storageConfigFromEnv())
  const connection = new Redis(process.env.NUXT_REDIS_URL ?? '', { maxRetriesPerRequest: 1, enableOfflineQueue: false, lazyConnect: true })
  connection.on('error', () => {})
  await connection.connect().catch(() => console.warn('[seed] Redis is not answering: the worker will pick the demo frames up when it is'))
  const queue = new Queue<AnalyseJob>(QUEUE_ANALYSE, { connection, defaultJobOptions: DEFAULT_JOB_OPTIONS })
  let queued = 0
  try {
    for (const r of DEMO_REELS) {
      let [reel] = await db.select().from(t.reels).where(and(eq(t.reels.productionId, productionId), eq(t.reels.name, r.name))).limit(1)
      if (!reel) {
        const id = firstId(await db.insert(t.reels).values({ teamId, productionId, name: r.name, sourceLabel: r.sourceLabel, sourceRange: r.sourceRange, createdBy: userId }).$returningId())
        ;[reel] = await db.select().from(t.reels).where(eq(t.reels.id, id))
      }
      for (const f of r.frames) {
        const bytes = new Uint8Array(await f.png())
        const inspected = await inspectUpload(bytes, { format: 'png' })
        const { frame, duplicate } = await createFrame(db, storage, { teamId, reelId: reel!.id, name: f.name, bytes, inspected, uploadedBy: userId })
        if (!duplicate) {
          await queueFrame(queue, frame.id)
          queued++
        }
      }
    }
  } finally {
    await queue.close().catch(() => {})
    connection.disconnect()
  }
  return queued
}

const { db, pool } = createDb(process.env.NUXT_DATABASE_URL ?? '', 2)
try {
  let [team] = await db.select().from(t.teams).where(eq(t.teams.name, DEMO_TEAM)).limit(1)
  if (!team) {
    const id = firstId(await db.insert(t.teams).values({ name: DEMO_TEAM }).$returningId())
    ;[team] = await db.select().from(t.teams).where(eq(t.teams.id, id))
  }
  let [spec] = await db.select().from(t.deliverySpecs).where(eq(t.deliverySpecs.teamId, team!.id)).orderBy(t.deliverySpecs.id).limit(1)
  if (!spec) {
    await copyBuiltinSpecs(db, team!.id)
    ;[spec] = await db.select().from(t.deliverySpecs).where(eq(t.deliverySpecs.teamId, team!.id)).orderBy(t.deliverySpecs.id).limit(1)
  }
  let ownerId = 0
  for (const u of DEMO_USERS) {
    let [user] = await db.select().from(t.users).where(eq(t.users.email, u.email)).limit(1)
    if (!user) {
      const id = firstId(await db.insert(t.users).values({ email: u.email, name: u.name, passwordHash: await hashPassword(u.password) }).$returningId())
      ;[user] = await db.select().from(t.users).where(eq(t.users.id, id))
    }
    if (u.role === 'owner') ownerId = user!.id
    await db.insert(t.memberships).values({ teamId: team!.id, userId: user!.id, role: u.role }).onDuplicateKeyUpdate({ set: { userId: user!.id } })
  }
  const [prod] = await db.select().from(t.productions)
    .where(and(eq(t.productions.teamId, team!.id), eq(t.productions.name, DEMO_PRODUCTION.name))).limit(1)
  if (!prod) {
    await db.insert(t.productions).values({ ...DEMO_PRODUCTION, teamId: team!.id, createdBy: ownerId, deliverySpecId: spec!.id })
  }
  const [production] = await db.select().from(t.productions)
    .where(and(eq(t.productions.teamId, team!.id), eq(t.productions.name, DEMO_PRODUCTION.name))).limit(1)
  const queued = await seedFrames(db, team!.id, production!.id, ownerId)
  console.log(`[seed] demo team "${DEMO_TEAM}" ready${queued ? `, ${queued} demo frame(s) queued for analysis` : ''}`)
} finally {
  await pool.end()
}
