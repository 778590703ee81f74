// Faults in the middle of a batch: a worker killed with SIGKILL, Redis stopped while files
// arrive (and restarted empty: it runs with --save ''), MariaDB restarted while the worker
// writes. Each time every stored frame must end `done` with exactly one analysis, and
// every refused file must leave nothing behind (an upload is stored and queued, or refused with a reason).
// Services are always restored, and the file ends with one worker of default settings.
import { createHash, randomBytes } from 'node:crypto'
import { and, count, countDistinct, eq, inArray } from 'drizzle-orm'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { killWorkers, startMariadbAgain, startRedisAgain, startWorker, stopMariadb, stopRedis, workerPids } from '../support/stack'

// Short stall and sweep timings for the workers of this file only, so that recovery takes
// seconds instead of BullMQ's 30 s lock. The lock a dead worker leaves behind has the
// duration that worker was started with, hence every worker here gets these settings.
const FAST = {
  LW_LOCK_DURATION_MS: '4000',
  LW_STALLED_INTERVAL_MS: '1000',
  LW_SWEEP_INTERVAL_MS: '1000',
  LW_SWEEP_QUEUED_AFTER_MS: '2000',
  LW_SWEEP_ANALYSING_AFTER_MS: '5000',
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

async function waitUntil(check: () => Promise<boolean>, what: string, ms = 120_000) {
  const until = Date.now() + ms
  while (Date.now() < until) {
    if (await check().catch(() => false)) return
    await sleep(250)
  }
  throw new Error(`${what} did not happen within ${ms / 1000} s`)
}

/** A signed-in user that can also send multipart (the JSON client in support cannot). */
class Session {
  cookie = ''
  async login(email: string, password: string) {
    const res = await fetch(new URL('/api/auth/login', APP_URL()), {
      method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password }),
    })
    expect(res.status).toBe(200)
    this.cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
    return this
  }

  async json(method: string, path: string, body?: unknown) {
    const res = await fetch(new URL(path, APP_URL()), {
      method, headers: { cookie: this.cookie, ...(body ? { 'content-type': 'application/json' } : {}) }, body: body ? JSON.stringify(body) : undefined,
    })
    return { status: res.status, body: await res.json().catch(() => null) }
  }

  /** One multipart request; a failed connection counts as a refusal, as it would for a script. */
  async upload(reelId: number, files: Frame[]) {
    const form = new FormData()
    for (const f of files) form.append('file', new Blob([f.bytes], { type: 'image/png' }), f.name)
    try {
      const res = await fetch(new URL(`/api/reels/${reelId}/frames`, APP_URL()), { method: 'POST', headers: { cookie: this.cookie }, body: form })
      const text = await res.text()
      let body: any = null
      try { body = JSON.parse(text) } catch { /* not JSON */ }
      return { status: res.status, body, text }
    } catch (e) {
      return { status: 0, body: null, text: (e as Error).message }
    }
  }
}

interface Frame { name: string; bytes: Uint8Array<ArrayBuffer>; sha256: string }

/** Small PNGs, every one different, big enough that a job takes a moment of engine time. */
async function makeFrames(n: number, label: string): Promise<Frame[]> {
  const salt = randomBytes(4)
  const w = 480
  const h = 270
  return Promise.all(Array.from({ length: n }, async (_, i) => {
    const px = Buffer.alloc(w * h * 3)
    let seed = (salt.readUInt32LE(0) ^ (i * 2654435761)) >>> 0
    for (let p = 0; p < w * h; p++) {
      seed = (seed * 1664525 + 1013904223) >>> 0
      const x = p % w
      px[p * 3] = (x * 255 / w + (seed >>> 28)) & 255
      px[p * 3 + 1] = (i * 37 + (seed >>> 26)) & 255
      px[p * 3 + 2] = ((p / w) * 255 / h) & 255
    }
    const bytes = new Uint8Array(await sharp(px, { raw: { width: w, height: h, channels: 3 } }).png({ compressionLevel: 1 }).toBuffer())
    return { name: `${label}-${String(i).padStart(3, '0')}.png`, bytes, sha256: createHash('sha256').update(bytes).digest('hex') }
  }))
}

const chunks = <T>(xs: T[], size: number) => Array.from({ length: Math.ceil(xs.length / size) }, (_, i) => xs.slice(i * size, (i + 1) * size))

async function statusCounts(reelId: number) {
  const rows = await db().select({ status: t.frames.status, n: count() }).from(t.frames).where(eq(t.frames.reelId, reelId)).groupBy(t.frames.status)
  const out = { queued: 0, analysing: 0, done: 0, failed: 0 }
  for (const r of rows) out[r.status] = Number(r.n)
  return out
}

/** Exactly one analysis per frame of the reel, and every frame `done`, in the database and through the API. */
async function expectAllDoneOnce(s: Session, reelId: number, frameIds: number[]) {
  const [a] = await db().select({ rows: count(), frames: countDistinct(t.analyses.frameId) }).from(t.analyses)
    .innerJoin(t.frames, eq(t.frames.id, t.analyses.frameId)).where(eq(t.frames.reelId, reelId))
  expect({ rows: Number(a!.rows), frames: Number(a!.frames) }).toEqual({ rows: frameIds.length, frames: frameIds.length })
  const analysed = await db().select({ id: t.analyses.frameId }).from(t.analyses).where(inArray(t.analyses.frameId, frameIds))
  expect(analysed.map((r) => r.id).sort((x, y) => x - y)).toEqual([...frameIds].sort((x, y) => x - y))
  const list = await s.json('GET', `/api/reels/${reelId}/frames?pageSize=500`)
  expect(list.status).toBe(200)
  expect(list.body.total).toBe(frameIds.length)
  expect(list.body.frames.filter((f: any) => f.status === 'done' && f.verdict !== null).length).toBe(frameIds.length)
}

async function waitAllDone(reelId: number, n: number, what: string) {
  await waitUntil(async () => (await statusCounts(reelId)).done === n, what, 240_000)
}

/** Kills every worker and starts one with `env`; a worker of this file is idle when this runs. */
function replaceWorker(env: Record<string, string>) {
  killWorkers('SIGKILL')
  startWorker(env)
}

let session: Session
let productionId: number

beforeAll(async () => {
  const team = await createTeamWithRoles()
  productionId = team.productionId
  session = await new Session().login(team.users.editor.email, team.users.editor.password)
  replaceWorker(FAST)
})

afterAll(async () => {
  // Later files need the whole stack and one worker as `npm test` started it.
  await startRedisAgain().catch(() => {})
  await startMariadbAgain().catch(() => {})
  replaceWorker({})
  await closeDb()
})

async function newReel(name: string) {
  const r = await session.json('POST', `/api/productions/${productionId}/reels`, { name })
  expect(r.status).toBe(201)
  return r.body.id as number
}

/** Uploads in requests of `per` files, `parallel` requests at a time, all expected to be stored. */
async function uploadAll(reelId: number, frames: Frame[], per = 10, parallel = 2) {
  const ids: number[] = []
  const groups = chunks(chunks(frames, per), parallel)
  for (const g of groups) {
    const res = await Promise.all(g.map((files) => session.upload(reelId, files)))
    for (const r of res) {
      expect(r.status, r.text).toBe(201)
      for (const f of r.body.files) {
        expect(f).toMatchObject({ ok: true, duplicate: false, queued: true })
        ids.push(f.frameId)
      }
    }
  }
  return ids
}

describe('faults during a batch', () => {
  it('a worker killed with SIGKILL mid-batch: every frame ends done, analysed once', async () => {
    killWorkers('SIGKILL')
    const reelId = await newReel('Kill -9')
    const frames = await makeFrames(100, 'kill')
    const ids = await uploadAll(reelId, frames)
    expect(new Set(ids).size).toBe(100)
    expect(await statusCounts(reelId)).toEqual({ queued: 100, analysing: 0, done: 0, failed: 0 })

    // Kill while a job is in flight: the frozen database then shows the jobs left behind.
    let orphaned = 0
    for (let tries = 0; tries < 5 && orphaned === 0; tries++) {
      startWorker(FAST)
      await waitUntil(async () => {
        const c = await statusCounts(reelId)
        return c.done >= 5 * (tries + 1) && c.analysing > 0
      }, 'a worker busy mid-batch')
      killWorkers('SIGKILL')
      await waitUntil(async () => workerPids().length === 0, 'the killed worker gone', 10_000)
      orphaned = (await statusCounts(reelId)).analysing
    }
    const atKill = await statusCounts(reelId)
    expect(orphaned).toBeGreaterThan(0)
    expect(atKill.done).toBeLessThan(100)
    expect(atKill.failed).toBe(0)

    startWorker(FAST)
    await waitAllDone(reelId, 100, 'all 100 frames done after the kill')
    await expectAllDoneOnce(session, reelId, ids)
  }, 300_000)

  it('Redis stopped while files arrive: each file is stored and later analysed, or refused with a reason', async () => {
    const reelId = await newReel('Redis outage')
    const before = await makeFrames(10, 'before')
    const during = await makeFrames(20, 'during')
    const storedIds = await uploadAll(reelId, before, 5)

    type Outcome = { frame: Frame; ok: boolean; frameId?: number; queued?: boolean; reason?: string }
    const outcomes: Outcome[] = []
    const send = async (files: Frame[]) => {
      const r = await session.upload(reelId, files)
      files.forEach((frame, i) => {
        const f = r.body?.files?.[i]
        if (f?.ok) outcomes.push({ frame, ok: true, frameId: f.frameId, queued: f.queued })
        else outcomes.push({ frame, ok: false, reason: f?.reason ?? r.body?.message ?? r.body?.statusMessage ?? r.text })
      })
    }
    try {
      // The first requests race the stop; the rest arrive while Redis is down.
      const inFlight = chunks(during.slice(0, 6), 2).map(send)
      await stopRedis()
      await Promise.all(inFlight)
      for (const files of chunks(during.slice(6), 2)) await send(files)
    } finally {
      await startRedisAgain()
    }

    expect(outcomes).toHaveLength(20)
    for (const o of outcomes) {
      if (!o.ok) {
        // A refusal says why and leaves no frame behind.
        expect(o.reason, o.frame.name).toMatch(/\w{3,}/)
        const rows = await db().select({ id: t.frames.id }).from(t.frames).where(and(eq(t.frames.reelId, reelId), eq(t.frames.sha256, o.frame.sha256)))
        expect(rows, o.frame.name).toEqual([])
      }
    }
    // Uploads after the stop reached no queue, yet each was stored: the outbox's case.
    const notQueued = outcomes.filter((o) => o.ok && o.queued === false)
    expect(notQueued.length).toBeGreaterThanOrEqual(14)
    storedIds.push(...outcomes.filter((o) => o.ok).map((o) => o.frameId!))

    // The app server's own Redis client reconnects: a new upload is queued again.
    const after = await makeFrames(20, 'after')
    let queuedAgain = false
    for (const f of after) {
      const r = await session.upload(reelId, [f])
      expect(r.status, r.text).toBe(201)
      storedIds.push(r.body.files[0].frameId)
      if (r.body.files[0].queued) { queuedAgain = true; break }
      await sleep(500)
    }
    expect(queuedAgain).toBe(true)

    const stored = await db().select({ id: t.frames.id }).from(t.frames).where(eq(t.frames.reelId, reelId))
    expect(stored.map((r) => r.id).sort((x, y) => x - y)).toEqual([...storedIds].sort((x, y) => x - y))
    await waitAllDone(reelId, storedIds.length, 'every stored frame done after Redis came back')
    await expectAllDoneOnce(session, reelId, storedIds)
  }, 300_000)

  it('MariaDB restarted while the worker writes: the batch completes', async () => {
    const reelId = await newReel('Database restart')
    const frames = await makeFrames(40, 'db')
    const ids = await uploadAll(reelId, frames)
    await waitUntil(async () => (await statusCounts(reelId)).done >= 3, 'the batch under way')
    try {
      await stopMariadb()
      // Long enough for jobs to fail against the missing database and go to backoff.
      await sleep(3000)
    } finally {
      await startMariadbAgain()
    }
    await waitAllDone(reelId, 40, 'all 40 frames done after the restart')
    await expectAllDoneOnce(session, reelId, ids)
  }, 300_000)
})
