// Attacks on sessions, redirects and upload completion, replayed over HTTP against the
// real stack. OWASP ASVS v4.0 requirement numbers beside each check are recalled from
// memory (V3.3.1 logout invalidates the session, V3.3.3 sessions ended on credential
// change, V5.1.5 redirects only to allowed destinations, V1.11.3 / V11.1.6 business logic
// safe under concurrency).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles, createUser } from '../support/fixtures'
import { linkIn, waitForMail } from '../support/mail'
import { png8 } from '../support/images'

afterAll(closeDb)

/** A client that replays another's cookie jar: what an attacker holding a copied cookie does. */
function replay(cookie: string) {
  return {
    get: (path: string) => fetch(new URL(path, APP_URL()), { headers: { cookie }, redirect: 'manual' }),
    post: (path: string, body: unknown) => fetch(new URL(path, APP_URL()), {
      method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify(body), redirect: 'manual',
    }),
  }
}

async function waitAnalysed(c: Client, frameId: number) {
  for (let i = 0; i < 240; i++) {
    const f = (await c.get(`/api/frames/${frameId}`)).body.frame
    if (f.status === 'done' || f.status === 'failed') return f
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`frame ${frameId} not analysed in time`)
}

describe('sessions end on the server', () => {
  let team: Awaited<ReturnType<typeof createTeamWithRoles>>
  beforeAll(async () => { team = await createTeamWithRoles() })

  it('V3.3.1: a cookie kept from before sign-out no longer reads or writes', async () => {
    const c = await new Client().login(team.users.editor.email, team.users.editor.password)
    const copied = replay(c.cookieHeader())
    expect((await copied.get('/api/me')).status).toBe(200)
    expect((await c.post('/api/auth/logout')).status).toBe(200)
    expect((await copied.get('/api/me')).status).toBe(401)
    const write = await copied.post(`/api/productions/${team.productionId}/reels`, { name: 'after sign-out' })
    expect(write.status).toBe(401)
  })

  it('V3.3.3: a password reset ends every other session of that person', async () => {
    const u = await createUser('reset-ends')
    const elsewhere = await new Client().login(u.email, u.password)
    const copied = replay(elsewhere.cookieHeader())
    expect((await new Client().post('/api/auth/password-reset/request', { email: u.email })).status).toBe(200)
    const token = new URL(linkIn(await waitForMail(u.email, /Reset your Linewise password/), '/reset-password?token=')).searchParams.get('token')!
    const resetter = new Client()
    expect((await resetter.post('/api/auth/password-reset/confirm', { token, password: 'a-new-password-77' })).status).toBe(200)
    expect((await elsewhere.get('/api/me')).status).toBe(401)
    expect((await copied.get('/api/me')).status).toBe(401)
    // The browser that chose the new password stays signed in.
    expect((await resetter.get('/api/me')).status).toBe(200)
  })
})

describe('V5.1.5: the redirect after sign-in stays on this site', () => {
  let c: Client
  beforeAll(async () => {
    const u = await createUser('redirect')
    c = await new Client().login(u.email, u.password)
  })

  // Each value decodes to something a naive "starts with one slash" check lets through.
  for (const value of ['/.%2F%2Fevil.example', '/%09/evil.example', '/%0A/evil.example', '/%5Cevil.example', '/..//evil.example', '/%2F%2Fevil.example']) {
    it(`?redirect=${value} goes to a page of this site, never elsewhere and never 500`, async () => {
      const res = await fetch(new URL(`/login?redirect=${value}`, APP_URL()), { headers: { cookie: c.cookieHeader() }, redirect: 'manual' })
      expect(res.status).toBeLessThan(500)
      expect(res.status).toBe(302)
      const location = res.headers.get('location')!
      // Resolved the way a browser resolves it, the target must be this origin.
      expect(new URL(location, APP_URL()).origin).toBe(new URL(APP_URL()).origin)
      expect(location).not.toMatch(/^\/\/|^\/\\|evil/)
    })
  }

  it('a same-site path with a query is kept', async () => {
    const res = await fetch(new URL(`/login?redirect=${encodeURIComponent('/reels/1?verdict=fail')}`, APP_URL()), { headers: { cookie: c.cookieHeader() }, redirect: 'manual' })
    expect(res.status).toBe(302)
    expect(res.headers.get('location')).toBe('/reels/1?verdict=fail')
  })
})

describe('upload completion under concurrency', () => {
  let editor: Client
  let productionId: number
  beforeAll(async () => {
    const team = await createTeamWithRoles()
    productionId = team.productionId
    editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  })
  const newReel = async () => (await editor.post(`/api/productions/${productionId}/reels`, { name: 'Race reel' })).body.id as number

  it('V11.1.6: eight parallel completions of one upload give one frame, analysed, with its original readable', async () => {
    const reelId = await newReel()
    const bytes = await png8(96, 54, 777)
    const announced = await editor.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'race.png', size: bytes.length, format: 'png' }] })
    const { uploadId, url } = announced.body.files[0]
    expect((await fetch(url, { method: 'PUT', body: bytes })).status).toBe(200)
    const answers = await Promise.all(Array.from({ length: 8 }, () => editor.post(`/api/reels/${reelId}/uploads/${uploadId}/complete`, {})))
    for (const a of answers) {
      expect([200, 201], JSON.stringify(a.body)).toContain(a.status)
      expect(a.body.ok).toBe(true)
      // The same upload completed twice is the same frame, not a duplicate of itself.
      expect(a.body.duplicate).toBe(false)
    }
    expect(answers.filter((a) => a.status === 201)).toHaveLength(1)
    const ids = new Set(answers.map((a) => a.body.frameId))
    expect(ids.size).toBe(1)
    const frameId = [...ids][0] as number
    const frame = await waitAnalysed(editor, frameId)
    expect(frame.status, frame.failReason).toBe('done')
    expect((await editor.get(`/api/frames/${frameId}/line/10`)).status).toBe(200)
    expect((await editor.get(`/api/frames/${frameId}/images/picture`)).status).toBe(200)
    expect((await editor.get(`/api/reels/${reelId}/frames`)).body.frames ?? []).toHaveLength(1)
  })

  it('V11.1.6: two uploads of the same bytes completed in parallel keep one frame and its original', async () => {
    const reelId = await newReel()
    const bytes = await png8(80, 45, 778)
    const announced = await editor.post(`/api/reels/${reelId}/uploads`, { files: [
      { name: 'twin-a.png', size: bytes.length, format: 'png' }, { name: 'twin-b.png', size: bytes.length, format: 'png' },
    ] })
    for (const f of announced.body.files) expect((await fetch(f.url, { method: 'PUT', body: bytes })).status).toBe(200)
    const answers = await Promise.all(announced.body.files.flatMap((f: { uploadId: number }) =>
      Array.from({ length: 4 }, () => editor.post(`/api/reels/${reelId}/uploads/${f.uploadId}/complete`, {}))))
    for (const a of answers) expect([200, 201], JSON.stringify(a.body)).toContain(a.status)
    const ids = new Set(answers.map((a) => a.body.frameId))
    expect(ids.size).toBe(1)
    const frameId = [...ids][0] as number
    expect((await waitAnalysed(editor, frameId)).status).toBe('done')
    expect((await editor.get(`/api/frames/${frameId}/line/5`)).status).toBe(200)
  })

  it('V11.1.6: parallel multipart posts of the same bytes keep one frame and its original', async () => {
    const reelId = await newReel()
    const bytes = await png8(64, 36, 779)
    const answers = await Promise.all(Array.from({ length: 6 }, () => editor.uploadFrames(reelId, [{ name: 'same.png', bytes }])))
    const ids = new Set(answers.map((a) => a.body.files[0]!.frameId))
    expect(ids.size).toBe(1)
    const frameId = [...ids][0] as number
    expect((await waitAnalysed(editor, frameId)).status).toBe('done')
    expect((await editor.get(`/api/frames/${frameId}/line/1`)).status).toBe(200)
    expect((await editor.get(`/api/frames/${frameId}/images/picture`)).status).toBe(200)
  })
})
