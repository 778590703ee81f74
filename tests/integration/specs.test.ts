// Delivery specs through the API: built-ins read-only, a team copy edited in versions, a
// production's spec chosen and changed, every measured frame judged again from its stored
// levels, decisions on changed frames kept and marked. Levels: a uniform full-range 8-bit
// picture at value v has luma code 16 + 219·v/255 (ITU-R BT.601-7 §2.5 studio coding — clause from memory; computed).
import { and, eq, inArray } from 'drizzle-orm'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { builtinSpec, type DeliverySpec } from '../../shared/engine'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let owner: Client
let reviewer: Client
let editor: Client
let copyId = 0
let productionId = 0
let reelId = 0
const frameIds: Record<string, number> = {}

const grey = (v: number) => sharp({ create: { width: 32, height: 18, channels: 3, background: { r: v, g: v, b: v } } }).png().toBuffer()
// 240 → code 222.1, 250 → 230.7, 120 → 119.1 (computed): all inside 16–235.
const LEVELS = { bright: 240, brighter: 250, mid: 120 }

async function waitDone(reel: number) {
  for (let i = 0; i < 240; i++) {
    const list = await owner.get(`/api/reels/${reel}/frames`)
    if (list.body.frames.length && list.body.frames.every((f: { status: string }) => f.status === 'done')) return list.body.frames
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error('frames were not analysed in time')
}

function tightened(spec: DeliverySpec, whiteCode8: number): DeliverySpec {
  return { ...spec, limits: spec.limits.map((l) => (l.id === 'luma-max' ? { ...l, value: whiteCode8, label: `Luma above code ${whiteCode8}` } : l)) }
}

beforeAll(async () => {
  team = await createTeamWithRoles()
  owner = await new Client().login(team.users.owner.email, team.users.owner.password)
  reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
})
afterAll(closeDb)

describe('delivery specs', () => {
  it('lists the built-in specs for every member, each naming its sources', async () => {
    const res = await editor.get(`/api/teams/${team.teamId}/specs`)
    expect(res.status).toBe(200)
    expect(res.body.specs.map((s: { builtin: string }) => s.builtin)).toEqual(['ntsc-setup', 'digital-studio', 'ebu-r103-v3'])
    for (const s of res.body.specs) expect(s.spec.description).toMatch(/Source/)
    // Parallel first visits give the team its copies once.
    await Promise.all([1, 2, 3].map(() => reviewer.get(`/api/teams/${team.teamId}/specs`)))
    expect((await db().select().from(t.deliverySpecs).where(eq(t.deliverySpecs.teamId, team.teamId))).length).toBe(3)
  })

  it('an owner copies the digital studio spec; the copy is version 1 with its history', async () => {
    const spec = { ...builtinSpec('digital-studio')!, name: 'client-studio', title: 'Client studio range' }
    const res = await owner.post(`/api/teams/${team.teamId}/specs`, { spec })
    expect(res.status).toBe(201)
    copyId = res.body.id
    expect((await owner.post(`/api/teams/${team.teamId}/specs`, { spec })).status).toBe(409) // same short name
    expect((await editor.post(`/api/teams/${team.teamId}/specs`, { spec: { ...spec, name: 'x' } })).status).toBe(403)
    const bad = await owner.post(`/api/teams/${team.teamId}/specs`, { spec: { ...spec, name: 'y', limits: [{ ...spec.limits[0]!, warningMargin: -1 }] } })
    expect(bad.status).toBe(400)
    expect(JSON.stringify(bad.body)).toMatch(/caution point must lie inside the limit/)
    const got = await editor.get(`/api/specs/${copyId}`)
    expect(got.body.versions).toHaveLength(1)
    expect(got.body.versions[0]).toMatchObject({ version: 1, changes: ['first version'] })
  })

  it('a production created with the copy measures against it; frames record spec and version', async () => {
    const p = await owner.post(`/api/teams/${team.teamId}/productions`, { name: 'Harbour Lights (fictional)', specId: copyId })
    expect(p.status).toBe(201)
    productionId = p.body.id
    const other = await createTeamWithRoles()
    const foreign = await owner.post(`/api/teams/${other.teamId}/productions`, { name: 'x', specId: copyId })
    expect(foreign.status).toBe(404)
    reelId = (await owner.post(`/api/productions/${productionId}/reels`, { name: 'Day 1' })).body.id
    const up = await owner.uploadFrames(reelId, await Promise.all(Object.entries(LEVELS).map(async ([k, v]) => ({ name: `${k}.png`, bytes: await grey(v) }))))
    up.body.files.forEach((f, i) => { frameIds[Object.keys(LEVELS)[i]!] = f.frameId! })
    await waitDone(reelId)
    const rows = await db().select().from(t.analyses).where(inArray(t.analyses.frameId, Object.values(frameIds)))
    expect(rows.map((r) => [r.specName, r.specVersion, r.verdict])).toEqual([['client-studio', 1, 'pass'], ['client-studio', 1, 'pass'], ['client-studio', 1, 'pass']])
    expect(rows.every((r) => r.levels !== null)).toBe(true)
  })

  it('built-in specs are read-only', async () => {
    const list = await owner.get(`/api/teams/${team.teamId}/specs`)
    const builtin = list.body.specs.find((s: { builtin: string }) => s.builtin === 'digital-studio')
    const res = await owner.post(`/api/specs/${builtin.id}/versions`, { spec: tightened(builtin.spec, 200), baseVersion: 1 })
    expect(res.status).toBe(409)
    expect(res.body.statusMessage).toMatch(/read-only/)
  })

  it('a new version is previewed, then applied: verdicts change, decisions are kept and marked, history grows', async () => {
    await reviewer.request('PUT', `/api/frames/${frameIds.brighter}/decision`, { decision: 'accepted' })
    await reviewer.request('PUT', `/api/frames/${frameIds.mid}/decision`, { decision: 'accepted' })
    const spec = tightened(builtinSpec('digital-studio')!, 225)
    const next = { ...spec, name: 'client-studio', title: 'Client studio range' }
    const preview = await owner.post(`/api/specs/${copyId}/versions`, { spec: next, baseVersion: 1, preview: true })
    expect(preview.status).toBe(200)
    // 230.7 > 225 (brighter) fails; 222.1 and 119.1 stay inside.
    expect(preview.body.text).toBe('1 frame changes verdict: 1 pass → fail')
    expect(preview.body.judged).toBe(3)
    const untouched = await db().select().from(t.analyses).where(eq(t.analyses.frameId, frameIds.brighter!))
    expect(untouched[0]!.verdict).toBe('pass') // a preview writes nothing
    const applied = await owner.post(`/api/specs/${copyId}/versions`, { spec: next, baseVersion: 1 })
    expect(applied.status).toBe(200)
    expect(applied.body).toMatchObject({ version: 2, changed: 1 })
    const after = await db().select().from(t.analyses).where(inArray(t.analyses.frameId, Object.values(frameIds)))
    expect(Object.fromEntries(after.map((a) => [a.frameId, [a.verdict, a.specVersion]]))).toEqual({
      [frameIds.bright!]: ['pass', 2], [frameIds.brighter!]: ['fail', 2], [frameIds.mid!]: ['pass', 2],
    })
    const [res] = after.filter((a) => a.frameId === frameIds.brighter)
    expect((res!.result as { reasons: Array<{ limit: string }> }).reasons.map((r) => r.limit)).toEqual(['luma-max'])
    const decisions = await db().select().from(t.decisions).where(inArray(t.decisions.frameId, [frameIds.brighter!, frameIds.mid!]))
    const byFrame = Object.fromEntries(decisions.map((d) => [d.frameId, d]))
    expect(byFrame[frameIds.brighter!]!.decision).toBe('accepted')
    expect(byFrame[frameIds.brighter!]!.recheckAt).not.toBeNull()
    expect(byFrame[frameIds.brighter!]!.recheckNote).toMatch(/Client studio range v2/)
    expect(byFrame[frameIds.mid!]!.recheckAt).toBeNull()
    const hist = await editor.get(`/api/specs/${copyId}`)
    expect(hist.body.versions.map((v: { version: number }) => v.version)).toEqual([2, 1])
    expect(hist.body.versions[0].changes[0]).toMatch(/Luma above code 225: 235 8-bit code.* → 225 8-bit code/)
    expect(hist.body.versions[0].rejudge).toMatchObject({ judged: 3, changed: 1 })
    // A new decision clears the mark.
    await reviewer.request('PUT', `/api/frames/${frameIds.brighter}/decision`, { decision: 'rejected', note: 'too hot for this client' })
    const [d] = await db().select().from(t.decisions).where(eq(t.decisions.frameId, frameIds.brighter!))
    expect(d!.recheckAt).toBeNull()
  })

  it('two owners saving on the same version in parallel: one wins, the other is told to reload', async () => {
    const owner2 = await new Client().login(team.users.owner.email, team.users.owner.password)
    const a = { ...tightened(builtinSpec('digital-studio')!, 226), name: 'client-studio', title: 'Client studio range' }
    const b = { ...tightened(builtinSpec('digital-studio')!, 227), name: 'client-studio', title: 'Client studio range' }
    const [ra, rb] = await Promise.all([owner.post(`/api/specs/${copyId}/versions`, { spec: a, baseVersion: 2 }), owner2.post(`/api/specs/${copyId}/versions`, { spec: b, baseVersion: 2 })])
    expect([ra.status, rb.status].sort()).toEqual([200, 409])
    const loser = ra.status === 409 ? ra : rb
    expect(loser.body.statusMessage).toMatch(/saved as version 3 meanwhile/)
    const versions = await db().select().from(t.deliverySpecVersions).where(eq(t.deliverySpecVersions.specId, copyId))
    expect(versions.map((v) => v.version).sort()).toEqual([1, 2, 3])
  })

  it('an owner switches the production to EBU R 103; signed out or demoted, the change is refused', async () => {
    const list = await owner.get(`/api/teams/${team.teamId}/specs`)
    const ebu = list.body.specs.find((s: { builtin: string }) => s.builtin === 'ebu-r103-v3')
    const preview = await owner.request('PUT', `/api/productions/${productionId}/spec`, { specId: ebu.id, preview: true })
    expect(preview.status).toBe(200)
    expect(preview.body.spec).toMatchObject({ title: 'European tolerance (EBU R 103 v3.0)', version: 1 })
    expect(preview.body.blocked).toBeNull()
    // Signed out: 401; demoted to editor: 403 — and nothing changes.
    const gone = await new Client().login(team.users.owner.email, team.users.owner.password)
    await gone.post('/api/auth/logout')
    expect((await gone.request('PUT', `/api/productions/${productionId}/spec`, { specId: ebu.id })).status).toBe(401)
    await db().update(t.memberships).set({ role: 'editor' }).where(and(eq(t.memberships.teamId, team.teamId), eq(t.memberships.userId, team.users.owner.id)))
    expect((await owner.request('PUT', `/api/productions/${productionId}/spec`, { specId: ebu.id })).status).toBe(403)
    await db().update(t.memberships).set({ role: 'owner' }).where(and(eq(t.memberships.teamId, team.teamId), eq(t.memberships.userId, team.users.owner.id)))
    const res = await owner.request('PUT', `/api/productions/${productionId}/spec`, { specId: ebu.id })
    expect(res.status).toBe(200)
    const rows = await db().select().from(t.analyses).where(inArray(t.analyses.frameId, Object.values(frameIds)))
    expect(new Set(rows.map((r) => `${r.specName} v${r.specVersion}`))).toEqual(new Set(['ebu-r103-v3 v1']))
    const p = await editor.get(`/api/productions/${productionId}`)
    expect(p.body.spec).toMatchObject({ id: ebu.id, name: 'ebu-r103-v3', version: 1 })
    const counts = (await editor.get(`/api/teams/${team.teamId}/specs`)).body.specs.map((s: { spec: { name: string }, productions: number }) => [s.spec.name, s.productions])
    expect(counts).toEqual([['ntsc-setup', 0], ['digital-studio', 0], ['ebu-r103-v3', 1], ['client-studio', 0]])
  })

  it('once a reel is signed off the production keeps its spec; a sign-off racing a change sees one or the other whole', async () => {
    await reviewer.post(`/api/reels/${reelId}/decisions`, { frameIds: Object.values(frameIds), decision: 'accepted' })
    const [sign, change] = await Promise.all([
      reviewer.post(`/api/reels/${reelId}/signoff`),
      owner.request('PUT', `/api/productions/${productionId}/spec`, { specId: copyId }),
    ])
    expect(sign.status).toBe(200)
    const [so] = await db().select().from(t.signoffs).where(eq(t.signoffs.reelId, reelId))
    if (change.status === 200) {
      // The change went first: the sheet records the spec the frames were judged against.
      expect(so!.specName).toBe('client-studio')
    } else {
      expect(change.status).toBe(409)
      expect(so!.specName).toBe('ebu-r103-v3')
    }
    const rows = await db().select().from(t.analyses).where(inArray(t.analyses.frameId, Object.values(frameIds)))
    expect(new Set(rows.map((r) => r.specName))).toEqual(new Set([so!.specName]))
    const later = await owner.request('PUT', `/api/productions/${productionId}/spec`, { specId: copyId })
    expect(later.status).toBe(409)
    expect(later.body.statusMessage).toMatch(/signed off: reopen it/)
  })
})
