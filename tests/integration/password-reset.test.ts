import { afterAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { closeDb, createUser } from '../support/fixtures'
import { linkIn, waitForMail } from '../support/mail'

afterAll(closeDb)

describe('password reset', () => {
  it('round trip: request, mail with link, new password, old one refused, link single-use', async () => {
    const u = await createUser('reset')
    const req = await new Client().post('/api/auth/password-reset/request', { email: u.email })
    expect(req.status).toBe(200)
    const link = linkIn(await waitForMail(u.email, /Reset your Linewise password/), '/reset-password?token=')
    expect((await fetch(link)).status).toBe(200)
    const token = new URL(link).searchParams.get('token')!
    const c = new Client()
    const done = await c.post('/api/auth/password-reset/confirm', { token, password: 'brand-new-password-1' })
    expect(done.status).toBe(200)
    expect((await c.get('/api/me')).status).toBe(200)
    expect((await new Client().post('/api/auth/login', { email: u.email, password: u.password })).status).toBe(401)
    await new Client().login(u.email, 'brand-new-password-1')
    expect((await new Client().post('/api/auth/password-reset/confirm', { token, password: 'third-password-22' })).status).toBe(410)
  })

  it('answers the same for an unknown address and sends nothing', async () => {
    const known = await createUser('known')
    const a = await new Client().post('/api/auth/password-reset/request', { email: known.email })
    const b = await new Client().post('/api/auth/password-reset/request', { email: `ghost-${known.id}@test.example` })
    expect(a.status).toBe(b.status)
    expect(b.body.message).toMatch(/If an account exists/)
  })

  it('refuses a short new password with 400', async () => {
    const res = await new Client().post('/api/auth/password-reset/confirm', { token: 'A'.repeat(43), password: 'short' })
    expect(res.status).toBe(400)
  })
})
