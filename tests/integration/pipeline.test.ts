// Upload → queue → worker → results through the real API, S3 fake, Redis and MariaDB.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, DEFAULT_SPEC_NAME, linePlot } from '../../shared/engine'
import { analysisJson, lineJson } from '../../shared/utils/report'
import { Queue } from 'bullmq'
import { eq } from 'drizzle-orm'
import { Redis } from 'ioredis'
import * as t from '../../server/db/schema'
import { decodeBytes } from '../../server/lib/decode-file'
import { keys, Storage, storageConfigFromEnv } from '../../server/lib/storage'
import { QUEUE_ANALYSE, type AnalyseJob } from '../../shared/utils/queues'
import { queueMissingViews } from '../../workers/sweeper'
import { measureLineup, withLineup } from '../../shared/utils/lineup'
import { Client } from '../support/api'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { png16, png8, still, uyvy, v210 } from '../support/images'

type Team = Awaited<ReturnType<typeof createTeamWithRoles>>
let team: Team
let editor: Client

beforeAll(async () => {
  team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
})
afterAll(closeDb)

async function newReel(body: Record<string, unknown> = {}) {
  const res = await editor.post(`/api/productions/${team.productionId}/reels`, { name: `Reel ${Date.now()}`, sourceLabel: 'Camera A', ...body })
  expect(res.status).toBe(201)
  return res.body.id as number
}

const upload = (reelId: number, files: { name: string; bytes: Uint8Array }[], query = '') => editor.uploadFrames(reelId, files, query)

async function waitForFrames(ids: number[], timeoutMs = 90_000) {
  const until = Date.now() + timeoutMs
  for (;;) {
    const frames = await Promise.all(ids.map((id) => editor.get(`/api/frames/${id}`).then((r) => r.body)))
    if (frames.every((f) => f.frame.status === 'done' || f.frame.status === 'failed')) return frames
    if (Date.now() > until) throw new Error(`frames still pending: ${frames.filter((f) => f.frame.status !== 'done').map((f) => `${f.frame.id}:${f.frame.status}`).join(', ')}`)
    await new Promise((r) => setTimeout(r, 300))
  }
}

describe('upload → analysis', () => {
  it('analyses 20 frames of every still format and their figures equal the engine run directly on the same files', async () => {
    const reelId = await newReel()
    const files: { name: string; bytes: Uint8Array }[] = []
    for (let i = 0; i < 8; i++) files.push({ name: `cam-a-${i}.png`, bytes: await png8(320 + 16 * i, 180, i + 1) })
    for (let i = 0; i < 3; i++) files.push({ name: `deep-${i}.png`, bytes: await png16(256, 144, 100 + i) })
    for (let i = 0; i < 3; i++) files.push({ name: `grab-${i}.jpg`, bytes: await still('jpeg', 400, 224, 200 + i) })
    for (let i = 0; i < 3; i++) files.push({ name: `grab-${i}.tif`, bytes: await still('tiff', 240, 136, 300 + i) })
    for (let i = 0; i < 3; i++) files.push({ name: `grab-${i}.webp`, bytes: await still('webp', 200, 120, 400 + i) })
    const res = await upload(reelId, files)
    expect(res.status).toBe(201)
    expect(res.body.files.map((f) => f.ok)).toEqual(files.map(() => true))
    const ids = res.body.files.map((f) => f.frameId!)
    const frames = await waitForFrames(ids)
    const spec = builtinSpec(DEFAULT_SPEC_NAME)!
    for (const [i, f] of files.entries()) {
      const got = frames[i]
      expect(got.frame.status, got.frame.failReason).toBe('done')
      const input = await decodeBytes(f.bytes, { range: 'full' })
      const direct = withLineup(analysisJson(analyseFrame(input, { matrix: '601', spec }), spec.name), measureLineup(input, { matrix: '601', spec }))
      const { specVersion: _v, specTitle: _t, levels: _l, analysedAt: _a, durationMs: _d, histograms: _h, images, ...api } = got.analysis
      expect(api).toEqual(direct)
      expect(Object.keys(images).sort()).toEqual(['overlay', 'picture', 'thumb', 'vectorscope', 'waveform-flat', 'waveform-luma', 'waveform-rgb'])
    }
    // The list shows the same verdicts, in upload order.
    const list = await editor.get(`/api/reels/${reelId}/frames?pageSize=50`)
    expect(list.body.total).toBe(20)
    expect(list.body.frames.map((f: { id: number }) => f.id)).toEqual(ids)
    expect(list.body.frames.map((f: { verdict: string }) => f.verdict)).toEqual(frames.map((f) => f.analysis.verdict))
  })

  it('analyses raw UYVY and v210 with the declared size, and serves line plots and images', async () => {
    const reelId = await newReel()
    const u = uyvy(720, 486, 11)
    const v = v210(1920, 4, 12)
    const a = await upload(reelId, [{ name: 'capture.uyvy', bytes: u }], '?raw=uyvy&width=720&height=486')
    const b = await upload(reelId, [{ name: 'capture.v210', bytes: v }], '?raw=v210&width=1920&height=4')
    expect(a.body.files[0]!.ok).toBe(true)
    expect(b.body.files[0]!.ok).toBe(true)
    const [fa, fb] = await waitForFrames([a.body.files[0]!.frameId!, b.body.files[0]!.frameId!])
    const spec = builtinSpec(DEFAULT_SPEC_NAME)!
    const ua = analysisJson(analyseFrame(await decodeBytes(u, { raw: 'uyvy', width: 720, height: 486 }), { spec }), spec.name)
    const vb = analysisJson(analyseFrame(await decodeBytes(v, { raw: 'v210', width: 1920, height: 4 }), { spec }), spec.name)
    expect(fa.analysis.luma).toEqual(ua.luma)
    expect(fa.analysis.bitDepth).toBe(8)
    expect(fb.analysis.luma).toEqual(vb.luma)
    expect(fb.analysis.bitDepth).toBe(10)
    // Codes 1 and 254 were in the UYVY data: sub-black and super-white are kept, not clipped.
    expect(fa.analysis.luma.min).toBeLessThan(16)
    expect(fa.analysis.luma.max).toBeGreaterThan(235)

    const line = await editor.get(`/api/frames/${fa.frame.id}/line/100`)
    expect(line.status).toBe(200)
    expect(line.body.line).toEqual(lineJson(linePlot(await decodeBytes(u, { raw: 'uyvy', width: 720, height: 486 }), 100, { matrix: '601' })))
    // 720 samples at 13.5 MHz: the last sample starts at 719 / 13.5 µs (ITU-R BT.601 sampling, computed).
    expect(line.body.line.samples.at(-1).us).toBeCloseTo(719 / 13.5, 3)
    expect((await editor.get(`/api/frames/${fa.frame.id}/line/486`)).status).toBe(400)

    const img = await fetch(new URL(`/api/frames/${fa.frame.id}/images/waveform-luma`, APP_URL()), {
      headers: { cookie: editor.cookieHeader() },
    })
    expect(img.status).toBe(200)
    expect(img.headers.get('content-type')).toBe('image/png')
    expect([...new Uint8Array(await img.arrayBuffer()).subarray(0, 4)]).toEqual([0x89, 0x50, 0x4e, 0x47])
    // The viewing copy of a raw capture, made by the worker: a JPEG at the frame's size.
    const pic = await fetch(new URL(`/api/frames/${fa.frame.id}/images/picture`, APP_URL()), { headers: { cookie: editor.cookieHeader() } })
    expect(pic.headers.get('content-type')).toBe('image/jpeg')
    const meta = await (await import('sharp')).default(new Uint8Array(await pic.arrayBuffer())).metadata()
    expect([meta.width, meta.height]).toEqual([720, 486])
  })

  it('gives a frame analysed before viewing copies and line data were stored both, through a job the worker runs', async () => {
    const reelId = await newReel()
    const bytes = await png8(200, 30, 91)
    const res = await upload(reelId, [{ name: 'older.png', bytes }])
    const [f] = await waitForFrames([res.body.files[0]!.frameId!])
    const frameId = f.frame.id as number
    // As an earlier version left it: no viewing copy, no line data, and an images list without them.
    const storage = new Storage(storageConfigFromEnv())
    const [row] = await db().select({ teamId: t.frames.teamId }).from(t.frames).where(eq(t.frames.id, frameId))
    await storage.delete(keys.image(row!.teamId, frameId, 'picture'))
    await storage.delete(keys.lines(row!.teamId, frameId))
    await db().update(t.analyses).set({ images: ['thumb', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] }).where(eq(t.analyses.frameId, frameId))
    expect((await editor.get(`/api/frames/${frameId}`)).body.analysis.images.picture).toBeUndefined()
    expect((await editor.get(`/api/frames/${frameId}/line/5`)).status).toBe(404)

    const connection = new Redis(process.env.NUXT_REDIS_URL!, { maxRetriesPerRequest: null })
    const queue = new Queue<AnalyseJob>(QUEUE_ANALYSE, { connection })
    try {
      expect(await queueMissingViews(db(), queue)).toBeGreaterThanOrEqual(1)
    } finally {
      await queue.close()
      await connection.quit()
    }
    const until = Date.now() + 60_000
    let images: Record<string, string> = {}
    while (!images.picture && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 300))
      images = (await editor.get(`/api/frames/${frameId}`)).body.analysis.images
    }
    expect(Object.keys(images).sort()).toEqual(['overlay', 'picture', 'thumb', 'vectorscope', 'waveform-flat', 'waveform-luma', 'waveform-rgb'])
    const line = await editor.get(`/api/frames/${frameId}/line/5`)
    expect(line.status).toBe(200)
    expect(line.body.line).toEqual(lineJson(linePlot(await decodeBytes(bytes, { range: 'full' }), 5, { matrix: '601' })))
    // The analysis itself was kept, not redone.
    expect((await editor.get(`/api/frames/${frameId}`)).body.analysis.analysedAt).toBe(f.analysis.analysedAt)
  })

  it('measures a studio-range reel with its own range setting', async () => {
    const reelId = await newReel({ sourceRange: 'studio' })
    const bytes = await png8(160, 90, 77)
    const res = await upload(reelId, [{ name: 'studio.png', bytes }])
    const [f] = await waitForFrames([res.body.files[0]!.frameId!])
    const spec = builtinSpec(DEFAULT_SPEC_NAME)!
    const direct = analysisJson(analyseFrame(await decodeBytes(bytes, { range: 'studio' }), { spec }), spec.name)
    expect(f.analysis.range).toBe('studio')
    expect(f.analysis.luma).toEqual(direct.luma)
  })

  it('takes files through presigned PUT URLs, in parts above the multipart threshold, and checks them on confirmation', async () => {
    const reelId = await newReel()
    const small = await png8(128, 72, 31)
    // Uncompressed noise: a real PNG larger than the multipart threshold (32 MiB).
    const { pattern8 } = await import('../support/images')
    const sharp = (await import('sharp')).default
    const big = await sharp(pattern8(3600, 3400, 32), { raw: { width: 3600, height: 3400, channels: 3 } }).png({ compressionLevel: 0 }).toBuffer()
    expect(big.length).toBeGreaterThan(32 * 2 ** 20)
    const lie = Buffer.from('plain text pretending to be a picture')
    const announced = await editor.post(`/api/reels/${reelId}/uploads`, { files: [
      { name: 'small.png', size: small.length, format: 'png' },
      { name: 'big.png', size: big.length, format: 'png' },
      { name: 'lie.png', size: lie.length, format: 'png' },
    ] })
    expect(announced.status).toBe(200)
    const [s, b, l] = announced.body.files
    expect(s.url).toBeTruthy()
    expect(b.parts.length).toBe(Math.ceil(big.length / (16 * 2 ** 20)))

    expect((await fetch(s.url, { method: 'PUT', body: small })).status).toBe(200)
    const etags = []
    for (const part of b.parts) {
      const chunk = big.subarray((part.partNumber - 1) * b.partSize, part.partNumber * b.partSize)
      const r = await fetch(part.url, { method: 'PUT', body: chunk })
      expect(r.status).toBe(200)
      etags.push({ partNumber: part.partNumber, etag: r.headers.get('etag')! })
    }
    expect((await fetch(l.url, { method: 'PUT', body: lie })).status).toBe(200)

    const cs = await editor.post(`/api/reels/${reelId}/uploads/${s.uploadId}/complete`, {})
    const cb = await editor.post(`/api/reels/${reelId}/uploads/${b.uploadId}/complete`, { parts: etags })
    const cl = await editor.post(`/api/reels/${reelId}/uploads/${l.uploadId}/complete`, {})
    expect(cs.status).toBe(201)
    expect(cb.status, JSON.stringify(cb.body)).toBe(201)
    expect(cl.status).toBe(415)
    expect(cl.body.reason).toMatch(/text file/)
    // Confirming twice does not make a second frame: the answer is the same frame again.
    const again = await editor.post(`/api/reels/${reelId}/uploads/${s.uploadId}/complete`, {})
    expect(again.status).toBe(200)
    expect(again.body).toMatchObject({ ok: true, frameId: cs.body.frameId, duplicate: false })
    // A refused upload stays refused.
    expect((await editor.post(`/api/reels/${reelId}/uploads/${l.uploadId}/complete`, {})).status).toBe(404)
    const [fs, fb] = await waitForFrames([cs.body.frameId, cb.body.frameId], 120_000)
    expect(fs.frame.status).toBe('done')
    expect(fb.frame.status).toBe('done')
    expect(fb.analysis.width).toBe(3600)
  })

  it('recognises the same content uploaded twice to a reel', async () => {
    const reelId = await newReel()
    const bytes = await png8(64, 36, 5)
    const first = await upload(reelId, [{ name: 'a.png', bytes }])
    const again = await upload(reelId, [{ name: 'a-copy.png', bytes }])
    expect(again.body.files[0]).toMatchObject({ ok: true, duplicate: true, frameId: first.body.files[0]!.frameId })
    expect((await editor.get(`/api/reels/${reelId}/frames`)).body.total).toBe(1)
  })
})
