// Every protected route × every role (signed in, and as a script with an API token of that
// role) × a member of another team × callers whose access has ended (signed out, password
// reset, removed from the team, token revoked). A route added to server/api without a row
// here fails the first test, so the matrix grows with the API.
import { readdirSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { firstId } from '../../server/db/client'
import * as t from '../../server/db/schema'
import { builtinSpec } from '../../shared/engine'
import { CAN, ROLES, type Permission, type Role } from '../../shared/utils/roles'
import { Client } from '../support/api'
import { addMember, closeDb, createTeamWithRoles, createUser, db, uid } from '../support/fixtures'
import { linkIn, waitForMail } from '../support/mail'
import { png8 } from '../support/images'

type Ctx = { teamId: number; productionId: number; specId: number; spareUserId: number; invitationId: number; reelId: number; frameId: number; uploadId: number; emptyReelId: number; clipId: number; tokenId: number; callerRole: Role }
interface Route {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'
  /** The allowed answer may be a 404 about the target's state (checked to carry its own message). */
  allowedMayBe404?: boolean
  file: string
  path: (c: Ctx) => string
  body?: (c: Ctx) => unknown
  /** null: any signed-in user, no team involved. */
  permission: Permission | null
  /** Needs a browser session: an API token gets 403 (tokens cannot mint tokens or end sessions). */
  sessionOnly?: boolean
}

const ROUTES: Route[] = [
  { method: 'GET', file: 'me.get.ts', path: () => '/api/me', permission: null },
  { method: 'GET', file: 'teams/index.get.ts', path: () => '/api/teams', permission: null },
  { method: 'GET', file: 'teams/[teamId]/index.get.ts', path: (c) => `/api/teams/${c.teamId}`, permission: 'view' },
  { method: 'GET', file: 'teams/[teamId]/members/index.get.ts', path: (c) => `/api/teams/${c.teamId}/members`, permission: 'view' },
  { method: 'PATCH', file: 'teams/[teamId]/members/[userId].patch.ts', path: (c) => `/api/teams/${c.teamId}/members/${c.spareUserId}`, body: () => ({ role: 'reviewer' }), permission: 'manageTeam' },
  { method: 'DELETE', file: 'teams/[teamId]/members/[userId].delete.ts', path: (c) => `/api/teams/${c.teamId}/members/${c.spareUserId}`, permission: 'manageTeam' },
  { method: 'GET', file: 'teams/[teamId]/invitations/index.get.ts', path: (c) => `/api/teams/${c.teamId}/invitations`, permission: 'manageTeam' },
  { method: 'POST', file: 'teams/[teamId]/invitations/index.post.ts', path: (c) => `/api/teams/${c.teamId}/invitations`, body: () => ({ email: `matrix-${uid()}@test.example`, role: 'editor' }), permission: 'manageTeam' },
  { method: 'DELETE', file: 'teams/[teamId]/invitations/[id].delete.ts', path: (c) => `/api/teams/${c.teamId}/invitations/${c.invitationId}`, permission: 'manageTeam' },
  { method: 'GET', file: 'teams/[teamId]/productions/index.get.ts', path: (c) => `/api/teams/${c.teamId}/productions`, permission: 'view' },
  { method: 'POST', file: 'teams/[teamId]/productions/index.post.ts', path: (c) => `/api/teams/${c.teamId}/productions`, body: () => ({ name: `Matrix ${uid()}`, client: '' }), permission: 'createProduction' },
  { method: 'GET', file: 'productions/[id]/index.get.ts', path: (c) => `/api/productions/${c.productionId}`, permission: 'view' },
  { method: 'POST', file: 'productions/[id]/reels.post.ts', path: (c) => `/api/productions/${c.productionId}/reels`, body: () => ({ name: `Reel ${uid()}` }), permission: 'upload' },
  { method: 'GET', file: 'reels/[id]/index.get.ts', path: (c) => `/api/reels/${c.reelId}`, permission: 'view' },
  { method: 'PATCH', file: 'reels/[id]/index.patch.ts', path: (c) => `/api/reels/${c.reelId}`, body: () => ({ sourceLabel: 'Camera B' }), permission: 'upload' },
  { method: 'GET', file: 'reels/[id]/frames.get.ts', path: (c) => `/api/reels/${c.reelId}/frames`, permission: 'view' },
  // JSON instead of multipart: an allowed role gets 400 "send the files…", never an access error.
  { method: 'POST', file: 'reels/[id]/frames.post.ts', path: (c) => `/api/reels/${c.reelId}/frames`, permission: 'upload' },
  { method: 'POST', file: 'reels/[id]/uploads.post.ts', path: (c) => `/api/reels/${c.reelId}/uploads`, body: () => ({ files: [{ name: 'a.png', size: 1000, format: 'png' }] }), permission: 'upload' },
  // Nothing was PUT to storage: an allowed role gets 409 "has not arrived".
  { method: 'POST', file: 'reels/[id]/uploads/[uploadId]/complete.post.ts', path: (c) => `/api/reels/${c.reelId}/uploads/${c.uploadId}/complete`, permission: 'upload' },
  { method: 'PUT', file: 'frames/[id]/decision.put.ts', path: (c) => `/api/frames/${c.frameId}/decision`, body: () => ({ decision: 'waived', note: 'specular highlight on chrome' }), permission: 'decide' },
  // 204 when a decision exists, 404 "has no decision" otherwise: the PUT case above may or may not have run first.
  { method: 'DELETE', file: 'frames/[id]/decision.delete.ts', path: (c) => `/api/frames/${c.frameId}/decision`, permission: 'decide', allowedMayBe404: true },
  { method: 'POST', file: 'reels/[id]/decisions.post.ts', path: (c) => `/api/reels/${c.reelId}/decisions`, body: (c) => ({ frameIds: [c.frameId], decision: 'accepted' }), permission: 'decide' },
  { method: 'GET', file: 'frames/[id]/index.get.ts', path: (c) => `/api/frames/${c.frameId}`, permission: 'view' },
  { method: 'GET', file: 'frames/[id]/line/[n].get.ts', path: (c) => `/api/frames/${c.frameId}/line/3`, permission: 'view' },
  { method: 'GET', file: 'frames/[id]/images/[kind].get.ts', path: (c) => `/api/frames/${c.frameId}/images/thumb`, permission: 'view' },
  // Sheet routes run on a reel without frames, so no case can sign the shared reel off and lock
  // it under the others: allowed roles get 409 (not signed off / no frames), never an access error.
  { method: 'GET', file: 'reels/[id]/sheet.get.ts', path: (c) => `/api/reels/${c.emptyReelId}/sheet`, permission: 'view' },
  { method: 'GET', file: 'reels/[id]/sheet.pdf.get.ts', path: (c) => `/api/reels/${c.emptyReelId}/sheet.pdf`, permission: 'downloadSheet' },
  { method: 'GET', file: 'reels/[id]/sheet.csv.get.ts', path: (c) => `/api/reels/${c.emptyReelId}/sheet.csv`, permission: 'downloadSheet' },
  { method: 'POST', file: 'reels/[id]/signoff.post.ts', path: (c) => `/api/reels/${c.emptyReelId}/signoff`, permission: 'signOff' },
  { method: 'GET', file: 'teams/[teamId]/specs/index.get.ts', path: (c) => `/api/teams/${c.teamId}/specs`, permission: 'view' },
  { method: 'POST', file: 'teams/[teamId]/specs/index.post.ts', path: (c) => `/api/teams/${c.teamId}/specs`, body: () => ({ spec: { ...builtinSpec('digital-studio')!, name: `matrix-${uid()}`, title: 'Matrix copy' } }), permission: 'manageSpecs' },
  { method: 'GET', file: 'specs/[id]/index.get.ts', path: (c) => `/api/specs/${c.specId}`, permission: 'view' },
  // Previews: an allowed role gets what re-judging would change, and nothing is saved.
  { method: 'POST', file: 'specs/[id]/versions.post.ts', path: (c) => `/api/specs/${c.specId}/versions`, body: () => ({ spec: { ...matrixSpec, title: 'Matrix spec, edited' }, baseVersion: 1, preview: true }), permission: 'manageSpecs' },
  { method: 'PUT', file: 'productions/[id]/spec.put.ts', path: (c) => `/api/productions/${c.productionId}/spec`, body: (c) => ({ specId: c.specId, preview: true }), permission: 'manageSpecs' },
  { method: 'GET', file: 'productions/[id]/matching.get.ts', path: (c) => `/api/productions/${c.productionId}/matching`, permission: 'view' },
  // The matrix frame is a picture, not bars: an allowed role gets 422 "not recognised as colour bars".
  { method: 'PUT', file: 'productions/[id]/reference.put.ts', path: (c) => `/api/productions/${c.productionId}/reference`, body: (c) => ({ frameId: c.frameId }), permission: 'decide' },
  { method: 'DELETE', file: 'productions/[id]/reference.delete.ts', path: (c) => `/api/productions/${c.productionId}/reference`, permission: 'decide' },
  // Clips: the clip of each case is freshly announced (still uploading), so allowed roles get
  // 409/422 about its state from the routes that need a measured or stored clip.
  { method: 'GET', file: 'reels/[id]/clips.get.ts', path: (c) => `/api/reels/${c.reelId}/clips`, permission: 'view' },
  // JSON instead of multipart: an allowed role gets 400 "send the clip…".
  { method: 'POST', file: 'reels/[id]/clips.post.ts', path: (c) => `/api/reels/${c.reelId}/clips`, permission: 'upload' },
  { method: 'POST', file: 'reels/[id]/clip-uploads.post.ts', path: (c) => `/api/reels/${c.reelId}/clip-uploads`, body: () => ({ name: 'cut.mov', size: 1000 }), permission: 'upload' },
  { method: 'POST', file: 'clips/[id]/complete.post.ts', path: (c) => `/api/clips/${c.clipId}/complete`, body: () => ({ parts: [{ partNumber: 1, etag: '"none"' }] }), permission: 'upload' },
  { method: 'GET', file: 'clips/[id]/index.get.ts', path: (c) => `/api/clips/${c.clipId}`, permission: 'view' },
  { method: 'GET', file: 'clips/[id]/timeline.get.ts', path: (c) => `/api/clips/${c.clipId}/timeline`, permission: 'view' },
  { method: 'POST', file: 'clips/[id]/cancel.post.ts', path: (c) => `/api/clips/${c.clipId}/cancel`, permission: 'upload' },
  { method: 'POST', file: 'clips/[id]/frames.post.ts', path: (c) => `/api/clips/${c.clipId}/frames`, body: () => ({ frame: 0 }), permission: 'view' },
  { method: 'POST', file: 'reels/[id]/reopen.post.ts', path: (c) => `/api/reels/${c.emptyReelId}/reopen`, body: () => ({ reason: 'access matrix' }), permission: 'reopen' },
  // Sign out everywhere ends the caller's own sessions: run on a throwaway session of the same person (see call()).
  { method: 'DELETE', file: 'auth/sessions.delete.ts', path: () => '/api/auth/sessions', permission: null, sessionOnly: true },
  { method: 'DELETE', file: 'teams/[teamId]/members/[userId]/sessions.delete.ts', path: (c) => `/api/teams/${c.teamId}/members/${c.spareUserId}/sessions`, permission: 'manageTeam' },
  { method: 'GET', file: 'teams/[teamId]/tokens/index.get.ts', path: (c) => `/api/teams/${c.teamId}/tokens`, permission: 'view' },
  // Every role may make a token of its own role; a token may not make one.
  { method: 'POST', file: 'teams/[teamId]/tokens/index.post.ts', path: (c) => `/api/teams/${c.teamId}/tokens`, body: (c) => ({ name: `matrix ${uid()}`, role: c.callerRole }), permission: 'view', sessionOnly: true },
  // The token is the caller's own (made in freshCtx for whoever calls).
  { method: 'DELETE', file: 'teams/[teamId]/tokens/[id].delete.ts', path: (c) => `/api/teams/${c.teamId}/tokens/${c.tokenId}`, permission: 'view' },
]

/** Routes that need no session: the token or the credentials are the proof. */
const PUBLIC = [
  'auth/login.post.ts', 'auth/logout.post.ts', 'auth/password-reset/request.post.ts', 'auth/password-reset/confirm.post.ts',
  'invitations/[token].get.ts', 'invitations/accept.post.ts',
]

function routeFiles(dir: string, root = dir): string[] {
  return readdirSync(dir).flatMap((e) => {
    const p = join(dir, e)
    return statSync(p).isDirectory() ? routeFiles(p, root) : [relative(root, p)]
  })
}

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let reelId = 0
let emptyReelId = 0
let frameId = 0
let clipId = 0
let outsider: Awaited<ReturnType<typeof createUser>>
type Caller = Role | 'outsider' | `token:${Role}`
const clients = new Map<Caller, Client>()
/** Who each caller is, so a per-call token or session can be made for them. */
const people = new Map<Caller, { id: number; email: string; password: string }>()

/** An API token of `role` for `userId` in the team, written straight to the database. */
async function tokenFor(teamId: number, userId: number, role: Role, extra: Partial<typeof t.apiTokens.$inferInsert> = {}) {
  const { createHash, randomBytes } = await import('node:crypto')
  const token = `lwt_${randomBytes(32).toString('base64url')}`
  const id = firstId(await db().insert(t.apiTokens).values({ teamId, userId, name: `matrix ${uid()}`, role, tokenHash: createHash('sha256').update(token).digest('hex'), ...extra }).$returningId())
  return { id, token }
}
let specId = 0
const matrixSpec = { ...builtinSpec('digital-studio')!, name: 'matrix-spec', title: 'Matrix spec' }

beforeAll(async () => {
  team = await createTeamWithRoles()
  const other = await createTeamWithRoles()
  outsider = other.users.owner
  for (const role of ROLES) {
    clients.set(role, await new Client().login(team.users[role].email, team.users[role].password))
    clients.set(`token:${role}`, new Client((await tokenFor(team.teamId, team.users[role].id, role)).token))
    people.set(role, team.users[role])
    people.set(`token:${role}`, team.users[role])
  }
  clients.set('outsider', await new Client().login(outsider.email, outsider.password))
  people.set('outsider', outsider)
  for (const e of ENDED) e.client = await e.make()
  removed = await removedMember()
  const owner = clients.get('owner')!
  specId = (await owner.post(`/api/teams/${team.teamId}/specs`, { spec: matrixSpec })).body.id
  reelId = (await owner.post(`/api/productions/${team.productionId}/reels`, { name: 'Matrix reel' })).body.id
  emptyReelId = (await owner.post(`/api/productions/${team.productionId}/reels`, { name: 'Matrix reel without frames' })).body.id
  const up = await owner.uploadFrames(reelId, [{ name: 'matrix.png', bytes: await png8(64, 36, 4242) }])
  frameId = up.body.files[0]!.frameId!
  // One announced clip (still uploading) for every case: its routes answer about its state.
  clipId = (await owner.post(`/api/reels/${reelId}/clip-uploads`, { name: 'matrix.mov', size: 1000 })).body.clipId
  for (let i = 0; i < 200; i++) {
    if ((await owner.get(`/api/frames/${frameId}`)).body.frame.status === 'done') break
    await new Promise((r) => setTimeout(r, 250))
  }
})
afterAll(closeDb)

/** Fresh targets for each call, so that a DELETE in one case cannot starve the next. */
async function freshCtx(caller?: { id: number }, callerRole: Role = 'owner'): Promise<Ctx> {
  const spare = await createUser('spare')
  await addMember(team.teamId, spare.id, 'editor')
  const invitationId = firstId(await db().insert(t.invitations).values({
    teamId: team.teamId, email: `pending-${uid()}@test.example`, role: 'editor', tokenHash: uid().padEnd(64, '0'), expiresAt: new Date(Date.now() + 86_400_000),
  }).$returningId())
  const announced = await clients.get('owner')!.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'pending.png', size: 1000, format: 'png' }] })
  const tokenId = (await tokenFor(team.teamId, caller?.id ?? team.users.owner.id, 'producer')).id
  return { teamId: team.teamId, productionId: team.productionId, specId, spareUserId: spare.id, invitationId, reelId, frameId, uploadId: announced.body.files[0].uploadId, emptyReelId, clipId, tokenId, callerRole }
}

async function call(client: Client, r: Route, c: Ctx, who?: { email: string; password: string }) {
  // Sign-out-everywhere would end the shared clients' sessions too: it runs as a throwaway person.
  if (r.file === 'auth/sessions.delete.ts' && who && !client.bearer) {
    const u = await createUser('everywhere')
    client = await new Client().login(u.email, u.password)
  }
  return client.request(r.method, r.path(c), r.body?.(c))
}

/**
 * The ways a caller's access ends; each must answer as if there were no caller at all.
 * Made once (beforeAll): an ended session stays ended for every route.
 */
const ENDED: { label: string; status: number; make: () => Promise<Client>; client?: Client }[] = [
  {
    label: 'V3.3.1 a cookie replayed after sign-out', status: 401, make: async () => {
      const u = await createUser('signed-out')
      await addMember(team.teamId, u.id, 'owner')
      const c = await new Client().login(u.email, u.password)
      const copy = new Client()
      ;(copy as unknown as { cookies: Map<string, string> }).cookies = new Map((c as unknown as { cookies: Map<string, string> }).cookies)
      await c.post('/api/auth/logout')
      return copy
    },
  },
  {
    label: 'V3.3.3 a session from before a password reset', status: 401, make: async () => {
      const u = await createUser('was-reset')
      await addMember(team.teamId, u.id, 'owner')
      const c = await new Client().login(u.email, u.password)
      await new Client().post('/api/auth/password-reset/request', { email: u.email })
      const token = new URL(linkIn(await waitForMail(u.email, /Reset your Linewise password/), '/reset-password?token=')).searchParams.get('token')!
      expect((await new Client().post('/api/auth/password-reset/confirm', { token, password: 'matrix-new-password-1' })).status).toBe(200)
      return c
    },
  },
  {
    label: 'a revoked API token', status: 401, make: async () => {
      const { token } = await tokenFor(team.teamId, team.users.owner.id, 'owner', { revokedAt: new Date() })
      return new Client(token)
    },
  },
  {
    label: 'an expired API token', status: 401, make: async () => {
      const { token } = await tokenFor(team.teamId, team.users.owner.id, 'owner', { expiresAt: new Date(Date.now() - 1000) })
      return new Client(token)
    },
  },
]

let removed: { session: Client; token: Client }

/** A member removed from the team: still signed in, but the team is gone for them (404), and so are their tokens (401). */
async function removedMember() {
  const u = await createUser('removed')
  await addMember(team.teamId, u.id, 'owner')
  const c = await new Client().login(u.email, u.password)
  const { token } = await tokenFor(team.teamId, u.id, 'owner')
  const owner = clients.get('owner')!
  expect((await owner.delete(`/api/teams/${team.teamId}/members/${u.id}`)).status).toBe(204)
  return { session: c, token: new Client(token) }
}

describe('access matrix', () => {
  it('lists every route file under server/api', () => {
    const files = routeFiles(join(process.cwd(), 'server/api')).sort()
    expect(files).toEqual([...ROUTES.map((r) => r.file), ...PUBLIC].sort())
  })

  for (const r of ROUTES) {
    describe(`${r.method} ${r.file}`, () => {
      it('answers 401 without a session', async () => {
        expect((await call(new Client(), r, await freshCtx())).status).toBe(401)
      })

      for (const e of ENDED) {
        it(`${e.label}: ${e.status}`, async () => {
          const res = await call(e.client!, r, await freshCtx())
          expect(res.status, JSON.stringify(res.body)).toBe(e.status)
        })
      }

      if (r.permission !== null) {
        it('a member removed from the team: 404 with their session, 401 with their token', async () => {
          expect((await call(removed.session, r, await freshCtx())).status).toBe(404)
          expect((await call(removed.token, r, await freshCtx())).status).toBe(401)
        })
      }

      for (const caller of [...ROLES, ...ROLES.map((x) => `token:${x}` as const)]) {
        const role = (caller.startsWith('token:') ? caller.slice(6) : caller) as Role
        const byToken = caller.startsWith('token:')
        const allowed = (r.permission === null || (CAN[r.permission] as readonly Role[]).includes(role)) && !(byToken && r.sessionOnly)
        it(`${byToken ? `API token (${role})` : role}: ${allowed ? 'allowed' : '403'}`, async () => {
          const res = await call(clients.get(caller)!, r, await freshCtx(people.get(caller), role), people.get(caller))
          if (allowed) {
            // Allowed means past the access checks: any answer but 401/403/404 and no server error.
            if (r.allowedMayBe404 && res.status === 404) expect(res.body.statusMessage).not.toBe('Not found')
            else expect([401, 403, 404], JSON.stringify(res.body)).not.toContain(res.status)
            expect(res.status, JSON.stringify(res.body)).toBeLessThan(500)
          } else {
            expect(res.status).toBe(403)
          }
        })
      }

      if (r.permission !== null) {
        it('a member of another team gets 404 and sees nothing', async () => {
          const res = await call(clients.get('outsider')!, r, await freshCtx(), outsider)
          expect(res.status).toBe(404)
          expect(JSON.stringify(res.body)).not.toContain(String(team.users.owner.email))
        })
      }
    })
  }

  it('a team-less route shows only the caller\'s own teams', async () => {
    const res = await clients.get('outsider')!.get('/api/teams')
    expect(res.body.map((x: { id: number }) => x.id)).not.toContain(team.teamId)
  })
})
