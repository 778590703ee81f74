// Every protected route × every role × a member of another team. A route added to
// server/api without a row here fails the first test, so the matrix grows with the API.
import { readdirSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { firstId } from '../../server/db/client'
import * as t from '../../server/db/schema'
import { CAN, ROLES, type Permission, type Role } from '../../shared/utils/roles'
import { Client } from '../support/api'
import { addMember, closeDb, createTeamWithRoles, createUser, db, uid } from '../support/fixtures'
import { png8 } from '../support/images'

type Ctx = { teamId: number; productionId: number; spareUserId: number; invitationId: number; reelId: number; frameId: number; uploadId: number; emptyReelId: number; clipId: number }
interface Route {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'
  /** The allowed answer may be a 404 about the target's state (checked to carry its own message). */
  allowedMayBe404?: boolean
  file: string
  path: (c: Ctx) => string
  body?: (c: Ctx) => unknown
  /** null: any signed-in user, no team involved. */
  permission: Permission | null
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
const clients = new Map<Role | 'outsider', Client>()

beforeAll(async () => {
  team = await createTeamWithRoles()
  const other = await createTeamWithRoles()
  outsider = other.users.owner
  for (const role of ROLES) clients.set(role, await new Client().login(team.users[role].email, team.users[role].password))
  clients.set('outsider', await new Client().login(outsider.email, outsider.password))
  const owner = clients.get('owner')!
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
async function freshCtx(): Promise<Ctx> {
  const spare = await createUser('spare')
  await addMember(team.teamId, spare.id, 'editor')
  const invitationId = firstId(await db().insert(t.invitations).values({
    teamId: team.teamId, email: `pending-${uid()}@test.example`, role: 'editor', tokenHash: uid().padEnd(64, '0'), expiresAt: new Date(Date.now() + 86_400_000),
  }).$returningId())
  const announced = await clients.get('owner')!.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'pending.png', size: 1000, format: 'png' }] })
  return { teamId: team.teamId, productionId: team.productionId, spareUserId: spare.id, invitationId, reelId, frameId, uploadId: announced.body.files[0].uploadId, emptyReelId, clipId }
}

async function call(client: Client, r: Route, c: Ctx) {
  return client.request(r.method, r.path(c), r.body?.(c))
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

      for (const role of ROLES) {
        const allowed = r.permission === null || (CAN[r.permission] as readonly Role[]).includes(role)
        it(`${role}: ${allowed ? 'allowed' : '403'}`, async () => {
          const res = await call(clients.get(role)!, r, await freshCtx())
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
          const res = await call(clients.get('outsider')!, r, await freshCtx())
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
