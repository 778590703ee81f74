import { afterAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { closeDb, createUser } from '../support/fixtures'

afterAll(closeDb)

describe('sign-in', () => {
  it('signs in with the right password and sets a sealed, HttpOnly, SameSite=Lax session cookie', async () => {
    const u = await createUser('signin')
    const c = new Client()
    const res = await c.post('/api/auth/login', { email: u.email, password: u.password })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: u.id, email: u.email })
    const cookie = res.headers.getSetCookie().find((s) => s.startsWith('linewise-session='))!
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    // Served over plain http here, so the cookie must not demand https.
    expect(cookie).not.toMatch(/Secure/i)
    // Sealed: the cookie does not carry the e-mail in clear.
    expect(decodeURIComponent(cookie)).not.toContain(u.email)
    const me = await c.get('/api/me')
    expect(me.status).toBe(200)
    expect(me.body.user.email).toBe(u.email)
  })

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const u = await createUser('case')
    const res = await new Client().post('/api/auth/login', { email: `  ${u.email.toUpperCase()} `, password: u.password })
    expect(res.status).toBe(200)
  })

  it('refuses a wrong password and an unknown account with the same message', async () => {
    const u = await createUser('wrong')
    const bad = await new Client().post('/api/auth/login', { email: u.email, password: 'not the password' })
    const unknown = await new Client().post('/api/auth/login', { email: `nobody-${u.id}@test.example`, password: 'whatever' })
    expect(bad.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(bad.body.statusMessage).toBe('E-mail or password is wrong')
    expect(unknown.body.statusMessage).toBe(bad.body.statusMessage)
  })

  it('refuses malformed input with 400', async () => {
    const res = await new Client().post('/api/auth/login', { email: 'not-an-address', password: 'x' })
    expect(res.status).toBe(400)
  })

  it('throttles after 5 failures for one account and address, even for the right password', async () => {
    const u = await createUser('throttle')
    const c = new Client()
    for (let i = 0; i < 5; i++) {
      expect((await c.post('/api/auth/login', { email: u.email, password: `wrong-${i}` })).status).toBe(401)
    }
    const blocked = await c.post('/api/auth/login', { email: u.email, password: u.password })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(blocked.body.statusMessage).toMatch(/Too many failed sign-ins/)
    // Another account from the same address is not blocked by this one's failures.
    const other = await createUser('unblocked')
    expect((await new Client().post('/api/auth/login', { email: other.email, password: other.password })).status).toBe(200)
  })

  it('signs out', async () => {
    const u = await createUser('signout')
    const c = await new Client().login(u.email, u.password)
    expect((await c.post('/api/auth/logout')).status).toBe(200)
    expect((await c.get('/api/me')).status).toBe(401)
  })
})
