// Bars check, source matching and blanking through the real API, worker, S3 fake and MariaDB.
// Frames: BT.801 75 % split-field bars built from the published equations with line-up errors
// applied in the composite U/V plane (tests/support/bars.ts); their figures are checked by the
// engine tests against SMPTE EG 1, here they must arrive unchanged and drive the verdicts.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { png8 } from '../support/images'
import { applyErrors, exactColour, splitFieldPatches, v210Frame } from '../support/bars'
import type { LineupErrors } from '../support/bars'

type Team = Awaited<ReturnType<typeof createTeamWithRoles>>
let team: Team
let editor: Client
let reviewer: Client
let owner: Client

beforeAll(async () => {
  team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  owner = await new Client().login(team.users.owner.email, team.users.owner.password)
})
afterAll(closeDb)

const bars = (e: LineupErrors) => v210Frame(splitFieldPatches(exactColour(0.75, '601', e), y => applyErrors(y, e, '601')), 720, 486).data

async function reelWith(name: string, file: { name: string, bytes: Uint8Array }, query = '?raw=v210&width=720&height=486') {
  const reel = await editor.post(`/api/productions/${team.productionId}/reels`, { name, sourceLabel: name })
  expect(reel.status).toBe(201)
  const up = await editor.uploadFrames(reel.body.id, [file], query)
  expect(up.body.files[0]!.ok, JSON.stringify(up.body)).toBe(true)
  return { reelId: reel.body.id as number, frameId: up.body.files[0]!.frameId as number }
}

async function frame(id: number) {
  for (let i = 0; i < 300; i++) {
    const r = await editor.get(`/api/frames/${id}`)
    if (r.body.frame.status === 'done' || r.body.frame.status === 'failed') return r.body
    await new Promise((res) => setTimeout(res, 300))
  }
  throw new Error(`frame ${id} still pending`)
}

const ids: Record<string, { reelId: number, frameId: number }> = {}

describe('bars check and source matching through the API', () => {
  it('stores the bars check with the analysis: recognised, figures, and hue-rotated bars flagged with their figure', async () => {
    ids.a = await reelWith('Camera A', { name: 'bars_a.v210', bytes: bars({}) })
    ids.b = await reelWith('Camera B', { name: 'bars_b.v210', bytes: bars({ blackOffsetIre: 2.1, chromaGain: 0.96, hueDeg: 3 }) })
    ids.c = await reelWith('Camera C', { name: 'bars_c.v210', bytes: bars({ lumaGain: 0.97 }) })
    ids.d = await reelWith('Camera D', { name: 'bars_d.v210', bytes: bars({ hueDeg: 10 }) })
    ids.photo = await reelWith('Stills', { name: 'still.png', bytes: await png8(320, 180, 5) }, '')
    const a = await frame(ids.a.frameId)
    expect(a.analysis.bars).toMatchObject({ recognised: true, pattern: 'sd-75-split', amplitude: 75, setup: 'absent', verdict: 'pass' })
    // 720 × 486 capture: the blanking estimate applies (the bars fill the line: H not judged).
    expect(a.analysis.blanking).toMatchObject({ applicable: true, verdict: 'unknown', vBlankingLinesPerField: 19.5 })
    expect(a.analysis.match).toBeNull()
    const d = await frame(ids.d.frameId)
    expect(d.analysis.verdict).toBe('fail')
    const hue = d.analysis.reasons.find((r: { limit: string }) => r.limit === 'bars-hue')
    expect(hue.value).toBeCloseTo(10, 0)
    expect(hue.message).toMatch(/^Bars check: Hue \(phase\) error \+10\.0°/)
    const photo = await frame(ids.photo.frameId)
    expect(photo.analysis.bars.recognised).toBe(false)
    expect(photo.analysis.bars.notes.length).toBeGreaterThan(0)
    expect(photo.analysis.blanking.applicable).toBe(false)
  })

  it('a reference cannot be a frame that is not bars, nor another production\'s frame', async () => {
    const notBars = await reviewer.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.photo!.frameId })
    expect(notBars.status).toBe(422)
    expect(notBars.body.statusMessage).toMatch(/not recognised as colour bars/)
    const other = await createTeamWithRoles()
    const otherOwner = await new Client().login(other.users.owner.email, other.users.owner.password)
    expect((await otherOwner.request('PUT', `/api/productions/${other.productionId}/reference`, { frameId: ids.a!.frameId })).status).toBe(404)
    expect((await otherOwner.get(`/api/productions/${team.productionId}/matching`)).status).toBe(404)
  })

  it('naming a reference matches every other source: the matching table reports the offsets put in', async () => {
    const put = await reviewer.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.a!.frameId })
    expect(put.status, JSON.stringify(put.body)).toBe(200)
    expect(put.body.reference.ref.frameId).toBe(ids.a!.frameId)
    const m = await editor.get(`/api/productions/${team.productionId}/matching`)
    expect(m.status).toBe(200)
    expect(m.body.sources.map((s: { reelName: string }) => s.reelName)).toEqual(['Camera A', 'Camera B', 'Camera C', 'Camera D'])
    const [sa, sb, sc, sd] = m.body.sources
    expect(sa.match).toBeNull()
    // Camera B: +2.1 IRE, chroma −4 %, hue +3.0° (the errors built in).
    expect(sb.match.levelOffsetIre).toBeCloseTo(2.1, 1)
    expect(sb.match.chromaGainPct).toBeCloseTo(-4, 0)
    expect(sb.match.hueOffsetDeg).toBeCloseTo(3, 0)
    // Hue reads within 0.3° of the +3° built in (10-bit codes), so the summary shows +3.0° or +3.1°.
    expect(sb.match.summary).toMatch(/^\+2\.1 IRE, gain ×1\.000, chroma −4 %, hue \+3\.[01]°$/)
    expect(sc.match.gainRatio).toBeCloseTo(0.97, 2)
    expect(sd.match.hueOffsetDeg).toBeCloseTo(10, 0)
    // Flagged like any failing frame: the match is among the frame's reasons and fails it.
    const b = await frame(ids.b!.frameId)
    expect(b.analysis.verdict).toBe('fail')
    expect(b.analysis.reasons.filter((r: { limit: string }) => r.limit.startsWith('match-')).map((r: { limit: string }) => r.limit)).toEqual(['match-level', 'match-chroma', 'match-hue'])
    const list = await editor.get(`/api/reels/${ids.b!.reelId}/frames?verdict=fail`)
    expect(list.body.frames.map((f: { id: number }) => f.id)).toEqual([ids.b!.frameId])
  })

  it('a frame analysed after the reference was named is matched by the worker', async () => {
    const up = await editor.uploadFrames(ids.c!.reelId, [{ name: 'bars_c2.v210', bytes: bars({ hueDeg: -3 }) }], '?raw=v210&width=720&height=486')
    const f = await frame(up.body.files[0]!.frameId!)
    expect(f.analysis.match.reference.frameId).toBe(ids.a!.frameId)
    expect(f.analysis.match.hueOffsetDeg).toBeCloseTo(-3, 0)
  })

  it('two reviewers naming different references at once leave one reference and every match against it', async () => {
    const [r1, r2] = await Promise.all([
      reviewer.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.c!.frameId }),
      owner.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.b!.frameId }),
    ])
    expect([r1.status, r2.status]).toEqual([200, 200])
    const rows = await db().select().from(t.barsReferences).where(eq(t.barsReferences.productionId, team.productionId))
    expect(rows).toHaveLength(1)
    const refId = rows[0]!.frameId
    const m = await editor.get(`/api/productions/${team.productionId}/matching`)
    expect(m.body.reference.ref.frameId).toBe(refId)
    for (const s of m.body.sources) {
      if (s.frameId === refId) expect(s.match).toBeNull()
      else expect(s.match.reference.frameId).toBe(refId)
    }
  })

  it('clearing the reference removes the matches; signed-out and demoted users are refused', async () => {
    const del = await reviewer.delete(`/api/productions/${team.productionId}/reference`)
    expect(del.status).toBe(200)
    const b = await frame(ids.b!.frameId)
    expect(b.analysis.match).toBeNull()
    expect(b.analysis.reasons.some((r: { limit: string }) => r.limit.startsWith('match-'))).toBe(false)
    const gone = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
    await gone.post('/api/auth/logout', {})
    expect((await gone.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.a!.frameId })).status).toBe(401)
    await db().update(t.memberships).set({ role: 'editor' }).where(eq(t.memberships.userId, team.users.reviewer.id))
    expect((await reviewer.request('PUT', `/api/productions/${team.productionId}/reference`, { frameId: ids.a!.frameId })).status).toBe(403)
    await db().update(t.memberships).set({ role: 'reviewer' }).where(eq(t.memberships.userId, team.users.reviewer.id))
  })
})
