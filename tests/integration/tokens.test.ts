// Personal API tokens over HTTP: made on the team page, shown once, stored hashed, scoped
// to one team and a role no wider than the maker's, revocable at once. OWASP ASVS v4.0
// numbers recalled from memory: V2.10 service authentication (V2.10.4-style secrets not
// stored in clear), V3.5.2 tokens checked server-side, V4.1.3 least privilege.
import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { APP_URL } from '../support/env'
import { addMember, closeDb, createTeam, createTeamWithRoles, db } from '../support/fixtures'
import { png8 } from '../support/images'

afterAll(closeDb)

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let owner: Client
let editor: Client
beforeAll(async () => {
  team = await createTeamWithRoles()
  owner = await new Client().login(team.users.owner.email, team.users.owner.password)
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
})

const make = (c: Client, body: Record<string, unknown>, teamId = team.teamId) => c.post(`/api/teams/${teamId}/tokens`, body)

describe('API tokens', () => {
  it('is shown once, stored as its SHA-256 only, and never listed', async () => {
    const res = await make(editor, { name: 'conform script', role: 'editor' })
    expect(res.status).toBe(201)
    expect(res.body.token).toMatch(/^lwt_[A-Za-z0-9_-]{43}$/)
    const [row] = await db().select().from(t.apiTokens).where(eq(t.apiTokens.id, res.body.id))
    expect(row!.tokenHash).toBe(createHash('sha256').update(res.body.token).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(res.body.token)
    const list = await editor.get(`/api/teams/${team.teamId}/tokens`)
    expect(list.body.map((x: { id: number }) => x.id)).toContain(res.body.id)
    expect(JSON.stringify(list.body)).not.toContain(res.body.token)
  })

  it('works as Authorization: Bearer on API routes, uploads included, and records when it was last used', async () => {
    const { token, id } = (await make(editor, { name: 'ingest', role: 'editor' })).body
    const script = new Client(token)
    const me = await script.get('/api/me')
    expect(me.status).toBe(200)
    expect(me.body.token).toEqual({ teamId: team.teamId, role: 'editor' })
    const reel = await script.post(`/api/productions/${team.productionId}/reels`, { name: 'From a script' })
    expect(reel.status).toBe(201)
    const up = await script.uploadFrames(reel.body.id, [{ name: 'grab.png', bytes: await png8(32, 18, 4711) }])
    expect(up.status).toBe(201)
    const [row] = await db().select().from(t.apiTokens).where(eq(t.apiTokens.id, id))
    expect(row!.lastUsedAt).not.toBeNull()
  })

  it('V4.1.3: a token has at most its maker\'s role; its role limits what it may do', async () => {
    expect((await make(editor, { name: 'too much', role: 'owner' })).status).toBe(403)
    expect((await make(editor, { name: 'sideways', role: 'reviewer' })).status).toBe(403)
    const producerToken = new Client((await make(owner, { name: 'sheets only', role: 'producer' })).body.token)
    const denied = await producerToken.post(`/api/productions/${team.productionId}/reels`, { name: 'no' })
    expect(denied.status).toBe(403)
    expect((await producerToken.get(`/api/teams/${team.teamId}/productions`)).status).toBe(200)
  })

  it('acts in its own team only: another team of the same person answers 404', async () => {
    const other = await createTeam('Other')
    await addMember(other, team.users.owner.id, 'owner')
    const script = new Client((await make(owner, { name: 'one team', role: 'owner' })).body.token)
    expect((await script.get(`/api/teams/${other}/productions`)).status).toBe(404)
    expect((await script.get('/api/teams')).body.map((x: { id: number }) => x.id)).toEqual([team.teamId])
  })

  it('a revoked token answers 401 at once; an expired one too', async () => {
    const made = (await make(editor, { name: 'short-lived', role: 'editor', expiresInDays: 1 })).body
    expect(new Date(made.expiresAt).getTime()).toBeGreaterThan(Date.now() + 86_000_000)
    const script = new Client(made.token)
    expect((await script.get('/api/me')).status).toBe(200)
    expect((await editor.delete(`/api/teams/${team.teamId}/tokens/${made.id}`)).status).toBe(204)
    const after = await script.get('/api/me')
    expect(after.status).toBe(401)
    expect(after.body.statusMessage).toMatch(/revoked/)
    const old = (await make(editor, { name: 'old', role: 'editor' })).body
    await db().update(t.apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(t.apiTokens.id, old.id))
    const expired = await new Client(old.token).get('/api/me')
    expect(expired.status).toBe(401)
    expect(expired.body.statusMessage).toMatch(/expired/)
  })

  it('a wrong token is refused and never falls back to a cookie sent with it', async () => {
    const res = await fetch(new URL('/api/me', APP_URL()), { headers: { authorization: 'Bearer lwt_not-a-token', cookie: editor.cookieHeader() } })
    expect(res.status).toBe(401)
  })

  it('a token cannot make tokens or sign anyone out everywhere', async () => {
    const script = new Client((await make(owner, { name: 'no minting', role: 'owner' })).body.token)
    expect((await make(script, { name: 'child', role: 'producer' })).status).toBe(403)
    expect((await script.delete('/api/auth/sessions')).status).toBe(403)
  })

  it('someone else\'s token is invisible to a non-owner and revocable by an owner', async () => {
    const mine = (await make(editor, { name: 'editor\'s', role: 'editor' })).body
    const reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
    expect((await reviewer.delete(`/api/teams/${team.teamId}/tokens/${mine.id}`)).status).toBe(404)
    expect((await reviewer.get(`/api/teams/${team.teamId}/tokens`)).body.map((x: { id: number }) => x.id)).not.toContain(mine.id)
    expect((await owner.get(`/api/teams/${team.teamId}/tokens`)).body.map((x: { id: number }) => x.id)).toContain(mine.id)
    expect((await owner.delete(`/api/teams/${team.teamId}/tokens/${mine.id}`)).status).toBe(204)
    expect((await new Client(mine.token).get('/api/me')).status).toBe(401)
  })

  it('V13.2.3: token requests are exempt from the Origin check (no browser attaches the header on its own)', async () => {
    const { token } = (await make(editor, { name: 'edit system', role: 'editor' })).body
    const res = await new Client(token).request('POST', `/api/productions/${team.productionId}/reels`, { name: 'cross-origin script' }, { origin: 'http://evil.example' })
    expect(res.status).toBe(201)
  })

  it('removal from the team revokes the member\'s tokens for it', async () => {
    const u = team.users.producer
    const producer = await new Client().login(u.email, u.password)
    const { token } = (await make(producer, { name: 'before removal', role: 'producer' })).body
    expect((await new Client(token).get('/api/me')).status).toBe(200)
    expect((await owner.delete(`/api/teams/${team.teamId}/members/${u.id}`)).status).toBe(204)
    expect((await new Client(token).get('/api/me')).status).toBe(401)
  })
})

describe('signing people out', () => {
  it('V3.3.x: "sign out everywhere" ends every session of the caller', async () => {
    const t2 = await createTeamWithRoles()
    const a = await new Client().login(t2.users.editor.email, t2.users.editor.password)
    const b = await new Client().login(t2.users.editor.email, t2.users.editor.password)
    const res = await a.delete('/api/auth/sessions')
    expect(res.status).toBe(200)
    expect(res.body.ended).toBe(2)
    expect((await a.get('/api/me')).status).toBe(401)
    expect((await b.get('/api/me')).status).toBe(401)
  })

  it('an owner signs a member out everywhere: their sessions and their tokens for the team end', async () => {
    const t2 = await createTeamWithRoles()
    const o = await new Client().login(t2.users.owner.email, t2.users.owner.password)
    const r = await new Client().login(t2.users.reviewer.email, t2.users.reviewer.password)
    const { token } = (await make(r, { name: 'review bot', role: 'reviewer' }, t2.teamId)).body
    const res = await o.delete(`/api/teams/${t2.teamId}/members/${t2.users.reviewer.id}/sessions`)
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ sessions: 1, tokens: 1 })
    expect((await r.get('/api/me')).status).toBe(401)
    expect((await new Client(token).get('/api/me')).status).toBe(401)
    // The owner's own session is untouched.
    expect((await o.get('/api/me')).status).toBe(200)
  })

  it('removal from a team ends access to that team at once; the person\'s other teams stay', async () => {
    const t2 = await createTeamWithRoles()
    const other = await createTeam('Kept')
    await addMember(other, t2.users.editor.id, 'editor')
    const o = await new Client().login(t2.users.owner.email, t2.users.owner.password)
    const e = await new Client().login(t2.users.editor.email, t2.users.editor.password)
    expect((await e.get(`/api/teams/${t2.teamId}/productions`)).status).toBe(200)
    expect((await o.delete(`/api/teams/${t2.teamId}/members/${t2.users.editor.id}`)).status).toBe(204)
    expect((await e.get(`/api/teams/${t2.teamId}/productions`)).status).toBe(404)
    expect((await e.get(`/api/teams/${other}/productions`)).status).toBe(200)
  })
})
