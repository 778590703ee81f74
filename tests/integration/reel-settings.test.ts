// A reel's settings after upload: the matrix and range re-measure the frames from their kept
// originals (the verdicts follow), only the fields sent change, the frame rate relabels the
// timecodes, and the change is refused after sign-off, without a session or to a producer.
// 75 % bars (SMPTE EG 1 — memory) coded BT.601 stay within the NTSC composite limits: the
// bars' lowest composite excursion (the blue bar) lies above −20 IRE; read with the BT.709
// matrix the same RGB gives more chroma on blue and falls below −20 IRE (computed: the
// blue bar's Pb is 0.75·0.5 in both, but BT.709's lower Kb lowers luma from 0.75·0.114 to
// 0.75·0.0722).
import sharp from 'sharp'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'

type Team = Awaited<ReturnType<typeof createTeamWithRoles>>
let team: Team
let editor: Client
let producer: Client

/** 75 % colour bars at 720×486 in full-range 8-bit RGB: 0.75 × 255 = 191 (computed). */
async function bars75(width = 720, height = 486) {
  const cols = [[191, 191, 191], [191, 191, 0], [0, 191, 191], [0, 191, 0], [191, 0, 191], [191, 0, 0], [0, 0, 191]]
  const px = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) px.set(cols[Math.min(6, Math.floor((x * 7) / width))]!, (y * width + x) * 3)
  }
  return sharp(px, { raw: { width, height, channels: 3 } }).png().toBuffer()
}

async function waitDone(frameId: number, timeoutMs = 90_000) {
  const until = Date.now() + timeoutMs
  for (;;) {
    const r = await editor.get(`/api/frames/${frameId}`)
    if (r.body.frame.status === 'done' && r.body.analysis) {
      const [a] = await db().select().from(t.analyses).where(eq(t.analyses.frameId, frameId))
      if (a) return { frame: r.body.frame, analysis: a }
    }
    if (r.body.frame.status === 'failed') throw new Error(`frame ${frameId} failed: ${r.body.frame.failReason}`)
    if (Date.now() > until) throw new Error(`frame ${frameId} still ${r.body.frame.status}`)
    await new Promise((res) => setTimeout(res, 300))
  }
}

let reelId = 0
let frameId = 0

beforeAll(async () => {
  team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  producer = await new Client().login(team.users.producer.email, team.users.producer.password)
  const res = await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Bars (fictional)', sourceLabel: 'Deck A', matrix: '709', frameRate: '29.97', dropFrame: true })
  expect(res.status).toBe(201)
  reelId = res.body.id
  const up = await editor.uploadFrames(reelId, [{ name: 'bars_01-00-00-00.png', bytes: await bars75() }])
  expect(up.status).toBe(201)
  frameId = up.body.files[0]!.frameId!
})
afterAll(closeDb)

describe('reel settings', () => {
  it('measures SD bars in a BT.709 reel as failing the composite floor, and says the size is unusual for BT.709', async () => {
    const f = await waitDone(frameId)
    expect(f.analysis.verdict).toBe('fail')
    expect(f.analysis.compMinIre).toBeLessThan(-20)
    expect(f.frame.timecode).toBe('01:00:00;00')
    const reel = (await editor.get(`/api/reels/${reelId}`)).body
    expect(reel.sizes).toEqual([{ width: 720, height: 486, frames: 1 }])
    expect(reel.frameRate).toBe('29.97')
  })

  it('re-measures from the kept original when the matrix changes, and changes only the field sent', async () => {
    const [before] = await db().select().from(t.frames).where(eq(t.frames.id, frameId))
    const res = await editor.patch(`/api/reels/${reelId}`, { matrix: '601' })
    expect(res.status).toBe(200)
    expect(res.body.remeasured).toBe(1)
    expect(res.body).toMatchObject({ matrix: '601', name: 'Bars (fictional)', sourceLabel: 'Deck A', sourceRange: 'full', frameRate: '29.97', dropFrame: true })
    const f = await waitDone(frameId)
    expect(f.analysis.verdict).toBe('pass')
    expect(f.analysis.compMinIre).toBeGreaterThan(-20)
    const [after] = await db().select().from(t.frames).where(eq(t.frames.id, frameId))
    expect([after!.objectKey, after!.sha256]).toEqual([before!.objectKey, before!.sha256])
    const rows = await db().select().from(t.analyses).where(eq(t.analyses.frameId, frameId))
    expect(rows.map((r) => [r.matrix, r.sourceRange])).toEqual([['601', 'full']])
  })

  it('writes nothing and queues nothing when the value sent is the value it has', async () => {
    const res = await editor.patch(`/api/reels/${reelId}`, { matrix: '601' })
    expect(res.status).toBe(200)
    expect(res.body.remeasured).toBe(0)
    const [f] = await db().select({ status: t.frames.status }).from(t.frames).where(eq(t.frames.id, frameId))
    expect(f!.status).toBe('done')
  })

  it('ends with one analysis, measured with the final settings, after parallel changes', async () => {
    const answers = await Promise.all([
      editor.patch(`/api/reels/${reelId}`, { matrix: '709' }),
      editor.patch(`/api/reels/${reelId}`, { sourceRange: 'studio' }),
      editor.patch(`/api/reels/${reelId}`, { matrix: '709' }),
    ])
    expect(answers.map((a) => a.status)).toEqual([200, 200, 200])
    await waitDone(frameId)
    // Settle: a job that measured with older settings measures again before it writes.
    const until = Date.now() + 60_000
    let rows: (typeof t.analyses.$inferSelect)[] = []
    while (Date.now() < until) {
      rows = await db().select().from(t.analyses).where(eq(t.analyses.frameId, frameId))
      if (rows.length === 1 && rows[0]!.matrix === '709' && rows[0]!.sourceRange === 'studio') break
      await new Promise((r) => setTimeout(r, 300))
    }
    expect(rows.map((r) => [r.matrix, r.sourceRange])).toEqual([['709', 'studio']])
    const reel = (await editor.get(`/api/reels/${reelId}`)).body
    expect([reel.matrix, reel.sourceRange]).toEqual(['709', 'studio'])
  })

  it('relabels timecodes when the frame rate changes, and refuses drop-frame where the rate has none', async () => {
    expect((await editor.patch(`/api/reels/${reelId}`, { frameRate: '25', dropFrame: true })).status).toBe(422)
    const res = await editor.patch(`/api/reels/${reelId}`, { frameRate: '25' })
    expect(res.status).toBe(200)
    expect(res.body.dropFrame).toBe(false)
    expect((await editor.get(`/api/frames/${frameId}`)).body.frame.timecode).toBe('01:00:00:00')
  })

  it('refuses a producer, a signed-out request and a signed-off reel', async () => {
    expect((await producer.patch(`/api/reels/${reelId}`, { matrix: '601' })).status).toBe(403)
    expect((await new Client().patch(`/api/reels/${reelId}`, { matrix: '601' })).status).toBe(401)
    await db().update(t.reels).set({ signedAt: new Date() }).where(eq(t.reels.id, reelId))
    const res = await editor.patch(`/api/reels/${reelId}`, { matrix: '601' })
    expect(res.status).toBe(409)
    expect((await editor.get(`/api/reels/${reelId}`)).body.matrix).toBe('709')
  })
})
