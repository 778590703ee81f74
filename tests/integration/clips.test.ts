// Clips end to end against the running stack: upload (scripted multipart and presigned
// parts), probe refusals, measurement in chunks by the worker, events with timecode, kept
// frames through the still pipeline, a decision on an event, cancel, and a worker killed
// mid-clip. Clips come from ffmpeg's generators (tests/unit/clips/make-clips.ts); expected
// timecodes are SMPTE ST 12-1 arithmetic (memory; computed beside each check).
import { readFileSync } from 'node:fs'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { decodeTimeline } from '../../shared/utils/clip-timeline'
import { APP_URL } from '../support/env'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { killWorkers, startWorker, workerPids } from '../support/stack'
import { ffmpegRunAsync, greyClipWithRunsAsync, tempDir } from '../unit/clips/make-clips'

const FAST = {
  LW_LOCK_DURATION_MS: '4000',
  LW_STALLED_INTERVAL_MS: '1000',
  LW_SWEEP_INTERVAL_MS: '1000',
  LW_SWEEP_QUEUED_AFTER_MS: '2000',
  LW_SWEEP_ANALYSING_AFTER_MS: '5000',
  LW_CLIP_CHUNK_FRAMES: '20',
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
async function waitUntil(check: () => Promise<boolean>, what: string, ms = 180_000) {
  const until = Date.now() + ms
  while (Date.now() < until) {
    if (await check().catch(() => false)) return
    await sleep(300)
  }
  throw new Error(`${what} did not happen within ${ms / 1000} s`)
}

const tmp = tempDir()
let editor: Client
let reviewer: Client
let reelId = 0

async function uploadClip(c: Client, name: string, bytes: Uint8Array, reel = reelId) {
  const form = new FormData()
  form.append('file', new Blob([bytes as BlobPart]), name)
  const res = await fetch(new URL(`/api/reels/${reel}/clips`, APP_URL()), { method: 'POST', body: form, headers: { cookie: c.cookieHeader() } })
  return { status: res.status, body: await res.json() as any }
}

async function waitClip(id: number, status = 'done') {
  let last: any
  await waitUntil(async () => {
    last = (await editor.get(`/api/clips/${id}`)).body
    if (last.clip.status === 'failed' && status !== 'failed') throw new Error(`clip failed: ${last.clip.failReason}`)
    return last.clip.status === status
  }, `clip ${id} ${status}`)
  return last
}

beforeAll(async () => {
  const team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  reelId = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Cut 3 — clips' })).body.id
  killWorkers('SIGKILL')
  startWorker(FAST)
})

afterAll(async () => {
  killWorkers('SIGKILL')
  startWorker({})
  tmp.remove()
  await closeDb()
})

describe('a clip uploaded by script', () => {
  it('is measured in chunks; its events carry the container\'s timecode; event frames get full scopes and decisions', async () => {
    const path = tmp.path('runs.mov')
    // 25 fps from 01:00:00:00; super-white 30–39 and crushed 70–74 (10-bit 1000 and 20: 8-bit 250 and 5, BT.601 coding).
    await greyClipWithRunsAsync(path, { rate: '25', frames: 100, runs: [{ from: 30, to: 39, code10: 1000 }, { from: 70, to: 74, code10: 20 }], timecode: '01:00:00:00' })
    const up = await uploadClip(editor, 'Cut 3 rough.mov', readFileSync(path))
    expect(up.status, JSON.stringify(up.body)).toBe(201)
    expect(up.body.clip).toMatchObject({ status: 'queued', startTimecode: '01:00:00:00', startTimecodeFound: true, frameCount: 100, width: 64, height: 36 })
    const done = await waitClip(up.body.clip.id)
    expect(done.clip).toMatchObject({ framesMeasured: 100, truncated: false, durationS: 4, specName: 'ntsc-setup' })
    // 100 frames in chunks of 20: five chunks, measured once each.
    const chunks = await db().select().from(t.clipChunks).where(eq(t.clipChunks.clipId, up.body.clip.id))
    expect(chunks.map((c) => [c.startFrame, c.measured])).toEqual([[0, 20], [20, 20], [40, 20], [60, 20], [80, 20]])
    // Frame 30 at 25 fps = 1 s 5 f after 01:00:00:00; 39 = 1 s 14 f; 70 = 2 s 20 f; 74 = 2 s 24 f (computed).
    expect(done.events.map((e: any) => [e.tcIn, e.tcOut, e.verdict, e.durationFrames, e.limits.map((l: any) => l.limit)])).toEqual([
      ['01:00:01:05', '01:00:01:14', 'fail', 10, ['luma-max']],
      ['01:00:02:20', '01:00:02:24', 'fail', 5, ['luma-min']],
    ])
    // The timeline object: one request, every frame.
    const res = await fetch(new URL(`/api/clips/${up.body.clip.id}/timeline`, APP_URL()), { headers: { cookie: editor.cookieHeader() } })
    expect(res.status).toBe(200)
    const tl = decodeTimeline(new Uint8Array(await res.arrayBuffer()))
    expect(tl.frames).toBe(100)
    expect([...tl.verdict].filter((v) => v === 2).length).toBe(15)
    // The worst frame of each event is a frame of the reel, analysed by the still pipeline.
    const frameId = done.events[0].frameId as number
    await waitUntil(async () => (await editor.get(`/api/frames/${frameId}`)).body.frame.status === 'done', 'event frame analysed')
    const frame = (await editor.get(`/api/frames/${frameId}`)).body
    expect(frame.frame.timecode).toMatch(/^01:00:01:(0[5-9]|1[0-4])$/)
    expect(frame.analysis.verdict).toBe('fail')
    // Filmstrip: every 10 s (frame 0 only in a 4 s clip) besides the two event frames.
    expect(done.kept.map((k: any) => k.kind).sort()).toEqual(['event', 'event', 'filmstrip'])
    // A reviewer waives the event exactly as a still.
    const d = await reviewer.request('PUT', `/api/frames/${frameId}/decision`, { decision: 'waived', note: 'flash frame, agreed with the online editor' })
    expect(d.status, JSON.stringify(d.body)).toBeLessThan(300)
    const after = (await editor.get(`/api/clips/${up.body.clip.id}`)).body
    expect(after.events[0]).toMatchObject({ decision: 'waived', note: 'flash frame, agreed with the online editor' })
    // The pass/fail sheet lists the clip with its start timecode, duration and events.
    const sheet = (await editor.get(`/api/reels/${reelId}/sheet`)).body
    const onSheet = sheet.clips.find((c: any) => c.id === up.body.clip.id)
    expect(onSheet).toMatchObject({ startTimecode: '01:00:00:00', frames: 100, durationS: 4 })
    expect(onSheet.events.map((e: any) => [e.tcIn, e.tcOut, e.decision, e.note])).toEqual([
      ['01:00:01:05', '01:00:01:14', 'waived', 'flash frame, agreed with the online editor'],
      ['01:00:02:20', '01:00:02:24', null, ''],
    ])
    // 250 → 106.3 IRE, 5 → 2.9 IRE (computed above, BT.601 coding on the setup scale).
    expect(onSheet.events[0].limits[0]).toMatch(/106\.3 IRE/)
    expect(onSheet.events[1].limits[0]).toMatch(/2\.9 IRE/)
    // A frame that was not kept is extracted on demand.
    const ask = await editor.post(`/api/clips/${up.body.clip.id}/frames`, { frame: 55 })
    expect(ask.status).toBe(202)
    let kept: number | null = null
    await waitUntil(async () => { kept = (await editor.post(`/api/clips/${up.body.clip.id}/frames`, { frame: 55 })).body.frameId; return !!kept }, 'frame 55 extracted')
    const f55 = (await editor.get(`/api/frames/${kept}`)).body.frame
    expect(f55.timecode).toBe('01:00:02:05') // 55 = 2 s 5 f at 25 fps (computed)
  })
})

describe('bad clips are refused at upload with their reason, and nothing is kept', () => {
  it('audio only, a still, unreadable bytes', async () => {
    await ffmpegRunAsync(['-f', 'lavfi', '-i', 'sine=f=1000:d=1', '-c:a', 'aac', tmp.path('tone.m4a')])
    await ffmpegRunAsync(['-f', 'lavfi', '-i', 'testsrc2=s=64x36', '-frames:v', '1', tmp.path('grab.png')])
    const cases: [string, Uint8Array, RegExp][] = [
      ['tone.m4a', readFileSync(tmp.path('tone.m4a')), /audio only/],
      ['grab.png', readFileSync(tmp.path('grab.png')), /still picture/],
      ['noise.mov', new Uint8Array(Array.from({ length: 3000 }, (_, i) => (i * 31) % 256)), /cannot read this file as video/],
    ]
    for (const [name, bytes, reason] of cases) {
      const r = await uploadClip(editor, name, bytes)
      expect(r.status, name).toBe(422)
      expect(r.body.reason).toMatch(reason)
    }
    const listed = (await editor.get(`/api/reels/${reelId}/clips`)).body.clips.filter((c: any) => ['tone.m4a', 'grab.png', 'noise.mov'].includes(c.name))
    expect(listed.map((c: any) => c.status)).toEqual(['failed', 'failed', 'failed'])
  })

  it('over the clip cap (200 GiB) is refused at announcement; stills keep their own cap', async () => {
    const r = await editor.post(`/api/reels/${reelId}/clip-uploads`, { name: 'huge.mov', size: 201 * 2 ** 30 })
    expect(r.status).toBe(400)
    expect(JSON.stringify(r.body)).toMatch(/larger than 200 GiB/)
  })
})

describe('presigned parts from the browser', () => {
  it('sends parts straight to S3, a failed part sent again, then completes once', async () => {
    const path = tmp.path('parts.mov')
    await greyClipWithRunsAsync(path, { rate: '25', frames: 30, runs: [] })
    const bytes = readFileSync(path)
    const a = await editor.post(`/api/reels/${reelId}/clip-uploads`, { name: 'parts.mov', size: bytes.length })
    expect(a.status).toBe(201)
    expect(a.body.parts.length).toBe(1)
    const put = (body: Uint8Array) => fetch(a.body.parts[0].url, { method: 'PUT', body: body as BodyInit })
    // A part cut short fails its upload (S3 checks the signed length); the same URL takes it again.
    await put(bytes.subarray(0, 100)).catch(() => null)
    const ok = await put(bytes)
    expect(ok.status).toBe(200)
    const etag = ok.headers.get('etag')!
    // A part that was never sent, or another part's ETag: S3 answers InvalidPart (Amazon S3 API
    // Reference, CompleteMultipartUpload, Errors); we answer 422 and keep the upload open.
    for (const parts of [[{ partNumber: 2, etag }], [{ partNumber: 1, etag: '"0123456789abcdef0123456789abcdef"' }]]) {
      const bad = await editor.post(`/api/clips/${a.body.clipId}/complete`, { parts })
      expect(bad.status).toBe(422)
      expect(bad.body.statusMessage).toMatch(/could not be joined/)
    }
    const [x, y] = await Promise.all([1, 2].map(() => editor.post(`/api/clips/${a.body.clipId}/complete`, { parts: [{ partNumber: 1, etag }] })))
    // Parallel completions: one joins and queues, the other is told it is under way.
    expect([x!.status, y!.status].sort()).toEqual([201, 409])
    await waitClip(a.body.clipId)
    const again = await editor.post(`/api/clips/${a.body.clipId}/complete`, { parts: [{ partNumber: 1, etag }] })
    expect(again.status).toBe(200)
    expect(await db().select().from(t.clips).where(and(eq(t.clips.reelId, reelId), eq(t.clips.name, 'parts.mov')))).toHaveLength(1)
  })
})

describe('cancel and a worker killed mid-clip', () => {
  it('an editor cancels a clip before it is measured: its chunks stop, no events or timeline are written', async () => {
    const path = tmp.path('long.mov')
    // 2 000 frames in chunks of 20: a hundred chunk jobs, far more than run before the cancel.
    await greyClipWithRunsAsync(path, { rate: '25', frames: 2000, runs: [{ from: 1900, to: 1910, code10: 1000 }] })
    const up = await uploadClip(editor, 'long.mov', readFileSync(path))
    expect(up.status).toBe(201)
    const c = await editor.post(`/api/clips/${up.body.clip.id}/cancel`)
    expect(c.status).toBe(200)
    expect(c.body.clip.status).toBe('cancelled')
    await sleep(4000)
    const chunks = await db().select().from(t.clipChunks).where(eq(t.clipChunks.clipId, up.body.clip.id))
    expect(chunks.filter((x) => x.measured !== null).length).toBeLessThan(100)
    const after = (await editor.get(`/api/clips/${up.body.clip.id}`)).body
    expect(after.clip.status).toBe('cancelled')
    expect(after.events).toEqual([])
    expect((await editor.get(`/api/clips/${up.body.clip.id}/timeline`)).status).toBe(409)
    expect((await editor.post(`/api/clips/${up.body.clip.id}/cancel`)).status).toBe(409)
  })

  it('resumes from its chunks: chunks measured before the kill are not measured again, and the clip ends measured once', async () => {
    const path = tmp.path('kill.mov')
    // FFV1 (lossless): the same 10-bit codes as v210 in 2 MB instead of 245 MB, so the upload is quick.
    await greyClipWithRunsAsync(path, { rate: '25', frames: 400, size: '640x360', codec: 'ffv1', runs: [{ from: 15, to: 25, code10: 1000 }, { from: 350, to: 360, code10: 20 }] })
    const up = await uploadClip(editor, 'kill.mov', readFileSync(path))
    expect(up.status).toBe(201)
    const id = up.body.clip.id as number
    await waitUntil(async () => {
      const rows = await db().select().from(t.clipChunks).where(eq(t.clipChunks.clipId, id))
      return rows.filter((r) => r.measured !== null).length >= 3 && rows.some((r) => r.measured === null)
    }, 'some chunks measured', 120_000)
    killWorkers('SIGKILL')
    await waitUntil(async () => workerPids().length === 0, 'the killed worker gone', 10_000)
    const before = await db().select().from(t.clipChunks).where(eq(t.clipChunks.clipId, id))
    const measuredBefore = before.filter((r) => r.measured !== null)
    expect(measuredBefore.length).toBeLessThan(before.length)
    startWorker(FAST)
    const done = await waitClip(id)
    const after = await db().select().from(t.clipChunks).where(eq(t.clipChunks.clipId, id))
    for (const b of measuredBefore) expect(after.find((a) => a.id === b.id)!.updatedAt.getTime()).toBe(b.updatedAt.getTime())
    expect(after.every((a) => a.measured === a.frameCount)).toBe(true)
    expect(done.clip.framesMeasured).toBe(400)
    // 15 = 00:00:00:15, 25 = 00:00:01:00, 350 = 00:00:14:00, 360 = 00:00:14:10 at 25 fps (computed).
    expect(done.events.map((e: any) => [e.tcIn, e.tcOut])).toEqual([['00:00:00:15', '00:00:01:00'], ['00:00:14:00', '00:00:14:10']])
    expect(await db().select().from(t.clipEvents).where(eq(t.clipEvents.clipId, id))).toHaveLength(2)
  }, 300_000)
})
