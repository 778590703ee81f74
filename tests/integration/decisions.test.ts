import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { png8 } from '../support/images'

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let editor: Client
let reviewer: Client
let reelId: number
let frameIds: number[]

beforeAll(async () => {
  team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
  reelId = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Decisions' })).body.id
  const up = await editor.uploadFrames(reelId, await Promise.all([1, 2, 3].map(async (i) => ({ name: `f${i}.png`, bytes: await png8(48, 27, 700 + i) }))))
  frameIds = up.body.files.map((f) => f.frameId!)
  for (let i = 0; i < 240; i++) {
    const list = await editor.get(`/api/reels/${reelId}/frames`)
    if (list.body.frames.every((f: { status: string }) => f.status === 'done')) break
    await new Promise((r) => setTimeout(r, 250))
  }
})
afterAll(closeDb)

describe('decisions', () => {
  it('a reviewer waives a frame with a note; who and when are audited; editors see it', async () => {
    const res = await reviewer.request('PUT', `/api/frames/${frameIds[0]}/decision`, { decision: 'waived', note: 'Specular highlight on the boat rail' })
    expect(res.status).toBe(200)
    const seen = await editor.get(`/api/frames/${frameIds[0]}`)
    expect(seen.body.decision).toMatchObject({ decision: 'waived', note: 'Specular highlight on the boat rail', decidedBy: { id: team.users.reviewer.id } })
    const [log] = await db().select().from(t.auditLog).where(and(eq(t.auditLog.action, 'frame.decided'), eq(t.auditLog.subjectId, frameIds[0]!)))
    expect(log).toMatchObject({ actorId: team.users.reviewer.id, teamId: team.teamId })
    expect(log!.details).toMatchObject({ decision: 'waived', previous: null })
  })

  it('refuses a waiver or a reject without a note, and decisions by editors and producers', async () => {
    expect((await reviewer.request('PUT', `/api/frames/${frameIds[1]}/decision`, { decision: 'rejected', note: '' })).status).toBe(400)
    expect((await reviewer.request('PUT', `/api/frames/${frameIds[1]}/decision`, { decision: 'waived' })).status).toBe(400)
    const byEditor = await editor.request('PUT', `/api/frames/${frameIds[1]}/decision`, { decision: 'accepted' })
    expect(byEditor.status).toBe(403)
    expect(byEditor.body.statusMessage).toMatch(/Editor/)
    const producer = await new Client().login(team.users.producer.email, team.users.producer.password)
    expect((await producer.post(`/api/reels/${reelId}/decisions`, { frameIds, decision: 'accepted' })).status).toBe(403)
  })

  it('bulk decisions, the decision filter and clearing a decision (audited with the previous value)', async () => {
    const res = await reviewer.post(`/api/reels/${reelId}/decisions`, { frameIds: [frameIds[1], frameIds[2]], decision: 'rejected', note: 'Crushed blacks in the wide' })
    expect(res.body).toEqual({ updated: 2, notAnalysed: [] })
    const rejected = await editor.get(`/api/reels/${reelId}/frames?decision=rejected`)
    expect(rejected.body.frames.map((f: { id: number }) => f.id)).toEqual([frameIds[1], frameIds[2]])
    expect(rejected.body.frames[0].decision).toMatchObject({ decision: 'rejected', decidedBy: { name: expect.any(String) } })
    expect((await editor.get(`/api/reels/${reelId}/frames?decision=none`)).body.total).toBe(0)
    expect((await reviewer.delete(`/api/frames/${frameIds[2]}/decision`)).status).toBe(204)
    expect((await editor.get(`/api/reels/${reelId}/frames?decision=none`)).body.frames.map((f: { id: number }) => f.id)).toEqual([frameIds[2]])
    const [log] = await db().select().from(t.auditLog).where(and(eq(t.auditLog.action, 'frame.decision_cleared'), eq(t.auditLog.subjectId, frameIds[2]!)))
    expect(log!.details).toEqual({ previous: { decision: 'rejected', note: 'Crushed blacks in the wide' } })
    const overview = await editor.get(`/api/productions/${team.productionId}`)
    const reel = overview.body.reels.find((r: { id: number }) => r.id === reelId)
    expect(reel.counts).toMatchObject({ total: 3, done: 3, waived: 1, rejected: 1, accepted: 0, undecided: 1 })
  })

  it('ignores frame ids of another reel in a bulk decision (each reel has its own sign-off lock)', async () => {
    const otherReel = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Decisions, other reel' })).body.id
    const res = await reviewer.post(`/api/reels/${otherReel}/decisions`, { frameIds: [frameIds[0]], decision: 'rejected', note: 'through the wrong reel' })
    expect(res.body.updated).toBe(0)
    expect((await editor.get(`/api/frames/${frameIds[0]}`)).body.decision.decision).toBe('waived')
  })

  it('ignores frame ids of another team in a bulk decision', async () => {
    const other = await createTeamWithRoles()
    const otherEditor = await new Client().login(other.users.editor.email, other.users.editor.password)
    const otherReel = (await otherEditor.post(`/api/productions/${other.productionId}/reels`, { name: 'Other' })).body.id
    const res = await reviewer.post(`/api/reels/${reelId}/decisions`, { frameIds: [frameIds[0], 999_999_999], decision: 'accepted' })
    expect(res.body.updated).toBe(1)
    expect((await reviewer.post(`/api/reels/${otherReel}/decisions`, { frameIds: [frameIds[0]], decision: 'accepted' })).status).toBe(404)
  })
})
