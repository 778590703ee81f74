import { eq } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, createUser, db, uid } from '../support/fixtures'
import { linkIn, waitForMail } from '../support/mail'

afterAll(closeDb)

const tokenOf = (link: string) => new URL(link).pathname.split('/').pop()!

describe('invitations', () => {
  it('round trip: owner invites, the mail arrives with a link, the invitee sets a password and joins with the role', async () => {
    const { teamId, users } = await createTeamWithRoles()
    const owner = await new Client().login(users.owner.email, users.owner.password)
    const email = `invitee-${uid()}@test.example`
    const created = await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'reviewer' })
    expect(created.status).toBe(201)

    const mail = await waitForMail(email, /invited you to/)
    const link = linkIn(mail, '/invitations/')
    expect(link.startsWith(process.env.LW_APP_URL!)).toBe(true)
    // The link opens a page of the app.
    expect((await fetch(link)).status).toBe(200)

    const token = tokenOf(link)
    const invitee = new Client()
    const preview = await invitee.get(`/api/invitations/${token}`)
    expect(preview.status).toBe(200)
    expect(preview.body).toMatchObject({ email, role: 'reviewer', hasAccount: false })

    const accepted = await invitee.post('/api/invitations/accept', { token, name: 'New Reviewer', password: 'a-long-new-password' })
    expect(accepted.status).toBe(200)
    expect(accepted.body).toEqual({ teamId, role: 'reviewer' })
    const me = await invitee.get('/api/me')
    expect(me.body.teams).toEqual([expect.objectContaining({ id: teamId, role: 'reviewer' })])

    // Single use.
    const again = await new Client().post('/api/invitations/accept', { token, name: 'X', password: 'another-long-password' })
    expect(again.status).toBe(410)
    // The new password works for a fresh sign-in.
    await new Client().login(email, 'a-long-new-password')

    const [row] = await db().select().from(t.auditLog).where(eq(t.auditLog.action, 'invitation.accepted')).orderBy(t.auditLog.id)
    expect(row).toBeDefined()
  })

  it('refuses an expired invitation with a reason', async () => {
    const { teamId, users } = await createTeamWithRoles()
    const owner = await new Client().login(users.owner.email, users.owner.password)
    const email = `late-${uid()}@test.example`
    const created = await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'editor' })
    await db().update(t.invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(t.invitations.id, created.body.id))
    const token = tokenOf(linkIn(await waitForMail(email, /invited you to/), '/invitations/'))
    const res = await new Client().post('/api/invitations/accept', { token, name: 'Late', password: 'a-long-new-password' })
    expect(res.status).toBe(410)
    expect(res.body.statusMessage).toMatch(/expired/)
  })

  it('an existing account must be signed in as the invited address, then joins without a new password', async () => {
    const { teamId, users } = await createTeamWithRoles()
    const existing = await createUser('existing')
    const owner = await new Client().login(users.owner.email, users.owner.password)
    expect((await owner.post(`/api/teams/${teamId}/invitations`, { email: existing.email, role: 'producer' })).status).toBe(201)
    const token = tokenOf(linkIn(await waitForMail(existing.email, /invited you to/), '/invitations/'))
    const anon = await new Client().post('/api/invitations/accept', { token, name: 'Someone', password: 'takeover-attempt-1' })
    expect(anon.status).toBe(409)
    const me = await new Client().login(existing.email, existing.password)
    const res = await me.post('/api/invitations/accept', { token })
    expect(res.status).toBe(200)
    expect(res.body.role).toBe('producer')
  })

  it('refuses to invite a current member, and a forged token', async () => {
    const { teamId, users } = await createTeamWithRoles()
    const owner = await new Client().login(users.owner.email, users.owner.password)
    expect((await owner.post(`/api/teams/${teamId}/invitations`, { email: users.editor.email, role: 'editor' })).status).toBe(409)
    expect((await new Client().get(`/api/invitations/${'A'.repeat(43)}`)).status).toBe(404)
  })
})

describe('members', () => {
  it('owner changes a role and removes a member; the last owner cannot be demoted', async () => {
    const { teamId, users } = await createTeamWithRoles()
    const owner = await new Client().login(users.owner.email, users.owner.password)
    expect((await owner.patch(`/api/teams/${teamId}/members/${users.editor.id}`, { role: 'reviewer' })).status).toBe(200)
    const list = await owner.get(`/api/teams/${teamId}/members`)
    expect(list.body.find((m: { userId: number }) => m.userId === users.editor.id).role).toBe('reviewer')
    const demote = await owner.patch(`/api/teams/${teamId}/members/${users.owner.id}`, { role: 'editor' })
    expect(demote.status).toBe(409)
    expect((await owner.delete(`/api/teams/${teamId}/members/${users.producer.id}`)).status).toBe(204)
    expect((await new Client().login(users.producer.email, users.producer.password).then((c) => c.get(`/api/teams/${teamId}`))).status).toBe(404)
  })
})
