// The edges of the API: partial updates, body caps, cross-site requests, response headers,
// reset throttling, names. OWASP ASVS v4.0 requirement numbers beside each check are
// recalled from memory: V13.2.3 CSRF protection on state-changing requests, V13.1.4-ish /
// V12.1.1 request size limits, V14.4.x HTTP security headers (V14.4.3 CSP, V14.4.4 nosniff,
// V14.4.5 HSTS, V14.4.6 Referrer-Policy, V14.4.7 frame-ancestors), V14.3.3 no server
// version headers, V2.2.1 anti-automation on reset, V5.1.4 input normalisation.
import { request } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { APP_URL } from '../support/env'
import { closeDb, createTeamWithRoles, createUser } from '../support/fixtures'
import { png8 } from '../support/images'

afterAll(closeDb)

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
let editor: Client
let reviewer: Client
beforeAll(async () => {
  team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  reviewer = await new Client().login(team.users.reviewer.email, team.users.reviewer.password)
})

/** A request from a chosen local address (127.0.0.x are all this machine), so throttles by address can be tested apart. */
function fromAddress(localAddress: string, path: string, body: unknown): Promise<{ status: number; body: any }> {
  const url = new URL(path, APP_URL())
  const data = JSON.stringify(body)
  return new Promise((resolve, reject) => {
    const req = request({ host: url.hostname, port: url.port, path: url.pathname, method: 'POST', localAddress, headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(data) } }, (res) => {
      let text = ''
      res.on('data', (c) => { text += c })
      res.on('end', () => resolve({ status: res.statusCode!, body: JSON.parse(text || 'null') }))
    })
    req.on('error', reject)
    req.end(data)
  })
}

async function mailCount(to: string) {
  const { MAIL_UI_URL } = await import('../support/env')
  const all = (await (await fetch(`${MAIL_UI_URL()}/api/email`)).json()) as { to: { address: string }[] }[]
  return all.filter((m) => m.to.some((t) => t.address === to)).length
}

describe('partial update of a reel', () => {
  it('PATCH { name } changes the name only; source label, matrix and range stay', async () => {
    const created = await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Day 1', sourceLabel: 'Camera B', matrix: '709', sourceRange: 'studio' })
    expect(created.status).toBe(201)
    const patched = await editor.patch(`/api/reels/${created.body.id}`, { name: 'Day 1 (graded)' })
    expect(patched.status).toBe(200)
    const reel = (await editor.get(`/api/reels/${created.body.id}`)).body
    const r = reel.reel ?? reel
    expect(r).toMatchObject({ name: 'Day 1 (graded)', sourceLabel: 'Camera B', matrix: '709', sourceRange: 'studio' })
  })
})

describe('V12.1.1: body size caps, declared or chunked', () => {
  it('a JSON body over 128 KiB is refused with 413 before it is read, even unauthenticated', async () => {
    const res = await new Client().post('/api/auth/login', { email: 'a@b.example', password: 'x'.repeat(200 * 1024) })
    expect(res.status).toBe(413)
  })

  it('a chunked JSON body is held to the same cap', async () => {
    let sent = 0
    const chunk = new TextEncoder().encode('x'.repeat(64 * 1024))
    const body = new ReadableStream<Uint8Array>({
      start(c) { c.enqueue(new TextEncoder().encode('{"email":"a@b.example","password":"')) },
      pull(c) {
        // Up to 64 MiB on offer; the server must stop long before.
        if (sent >= 64 * 2 ** 20) return c.close()
        sent += chunk.length
        c.enqueue(chunk)
      },
    })
    let status = 0
    try {
      const res = await fetch(new URL('/api/auth/login', APP_URL()), { method: 'POST', body, headers: { 'content-type': 'application/json' }, duplex: 'half' } as RequestInit)
      status = res.status
    } catch {
      status = -1 // the server closed the connection after answering: also a refusal
    }
    expect([413, -1]).toContain(status)
    // What the client managed to hand over before the connection closed: far below what was on offer.
    expect(sent).toBeLessThan(16 * 2 ** 20)
  })

  it('a chunked multipart upload is held to the request cap (1 GiB) instead of being read to its end', async () => {
    const reel = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Chunked' })).body.id
    const boundary = 'lwboundary'
    const head = new TextEncoder().encode(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.png"\r\nContent-Type: application/octet-stream\r\n\r\n`)
    const chunk = new Uint8Array(4 * 2 ** 20)
    let sent = 0
    const offer = 1.5 * 2 ** 30
    const body = new ReadableStream<Uint8Array>({
      start(c) { c.enqueue(head) },
      pull(c) {
        if (sent >= offer) return c.close()
        sent += chunk.length
        c.enqueue(chunk)
      },
    })
    let status = 0
    try {
      const res = await fetch(new URL(`/api/reels/${reel}/frames`, APP_URL()), {
        method: 'POST', body, duplex: 'half', headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, cookie: editor.cookieHeader() },
      } as RequestInit)
      status = res.status
      await res.text()
    } catch {
      status = -1
    }
    expect([413, -1]).toContain(status)
    // Reading stopped at the cap: at most the cap plus what was in flight in socket buffers.
    expect(sent).toBeLessThan(2 ** 30 + 64 * 2 ** 20)
  })
})

describe('V13.2.3: cross-site requests', () => {
  const reelBody = () => ({ name: `Cross ${Math.random()}` })

  it('a state-changing request with a foreign Origin is refused, and nothing is created', async () => {
    const before = (await editor.get(`/api/productions/${team.productionId}`)).body
    const res = await editor.request('POST', `/api/productions/${team.productionId}/reels`, reelBody(), { origin: 'http://evil.example' })
    expect(res.status).toBe(403)
    const after = (await editor.get(`/api/productions/${team.productionId}`)).body
    expect(JSON.stringify(after.reels?.length)).toBe(JSON.stringify(before.reels?.length))
  })

  it('a foreign Referer without Origin is refused; Origin "null" too', async () => {
    expect((await editor.request('POST', `/api/productions/${team.productionId}/reels`, reelBody(), { referer: 'http://evil.example/page' })).status).toBe(403)
    expect((await editor.request('POST', `/api/productions/${team.productionId}/reels`, reelBody(), { origin: 'null' })).status).toBe(403)
  })

  it('the app\'s own Origin passes', async () => {
    const res = await editor.request('POST', `/api/productions/${team.productionId}/reels`, reelBody(), { origin: new URL(APP_URL()).origin })
    expect(res.status).toBe(201)
  })

  it('the multipart upload routes (stills and clips) skip only the JSON check: a foreign Origin is refused there too, and nothing is stored', async () => {
    const reel = await editor.post(`/api/productions/${team.productionId}/reels`, reelBody())
    expect(reel.status).toBe(201)
    for (const route of ['frames', 'clips']) {
      const form = new FormData()
      form.append('file', new Blob([await png8(16, 16, 7) as BlobPart]), `cross.${route === 'clips' ? 'mov' : 'png'}`)
      const res = await fetch(new URL(`/api/reels/${reel.body.id}/${route}`, APP_URL()), { method: 'POST', body: form, headers: { cookie: editor.cookieHeader(), origin: 'http://evil.example' } })
      expect(res.status, route).toBe(403)
    }
    expect((await editor.get(`/api/reels/${reel.body.id}/frames`)).body.total).toBe(0)
    expect((await editor.get(`/api/reels/${reel.body.id}/clips`)).body.clips).toEqual([])
  })

  it('form-encoded and text/plain bodies are refused on JSON routes (a sign-in included)', async () => {
    const u = await createUser('form')
    for (const type of ['application/x-www-form-urlencoded', 'text/plain', 'multipart/form-data; boundary=x']) {
      const res = await fetch(new URL('/api/auth/login', APP_URL()), { method: 'POST', headers: { 'content-type': type }, body: `email=${encodeURIComponent(u.email)}&password=${encodeURIComponent(u.password)}` })
      expect(res.status, type).toBe(415)
      expect(res.headers.getSetCookie()).toEqual([])
    }
  })
})

describe('V14.4: response headers', () => {
  it('pages carry a nonce-based CSP that allows the S3 endpoint for uploads, frame-ancestors none, nosniff, Referrer-Policy, and no x-powered-by', async () => {
    const res = await fetch(new URL('/login', APP_URL()))
    expect(res.status).toBe(200)
    const csp = res.headers.get('content-security-policy')!
    expect(csp).toMatch(/frame-ancestors 'none'/)
    expect(csp).toMatch(/script-src 'self' 'strict-dynamic' 'nonce-[A-Za-z0-9+/=_-]+'/)
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/)
    expect(csp).toMatch(/object-src 'none'/)
    expect(csp).toContain(new URL(process.env.NUXT_S3_ENDPOINT!).origin)
    const nonce = csp.match(/'nonce-([^']+)'/)![1]!
    const html = await res.text()
    // Every script in the page carries the nonce (or is JSON data, which never runs).
    for (const tag of html.match(/<script\b[^>]*>/g) ?? []) {
      if (/type="application\/json"/.test(tag)) continue
      expect(tag).toContain(`nonce="${nonce}"`)
    }
    expect(res.headers.get('x-content-type-options')).toBe('nosniff')
    expect(res.headers.get('referrer-policy')).toBe('same-origin')
    expect(res.headers.get('x-frame-options')).toBe('DENY')
    expect(res.headers.get('x-powered-by')).toBeNull()
  })

  it('successful API answers carry them too (a CSP only matters for documents, so JSON gets the rest)', async () => {
    const res = await editor.get('/api/me')
    expect(res.status).toBe(200)
    expect(res.headers.get('x-content-type-options')).toBe('nosniff')
    expect(res.headers.get('x-frame-options')).toBe('DENY')
    expect(res.headers.get('referrer-policy')).toBe('same-origin')
    expect(res.headers.get('x-powered-by')).toBeNull()
  })
})

describe('V2.2.1: password-reset requests are throttled', () => {
  it('per e-mail address: the 4th request in an hour answers 429 and only 3 mails go out', async () => {
    const u = await createUser('reset-throttle')
    const answers = []
    for (let i = 0; i < 4; i++) answers.push(await fromAddress('127.0.0.21', '/api/auth/password-reset/request', { email: u.email }))
    expect(answers.map((a) => a.status)).toEqual([200, 200, 200, 429])
    // The same for an address without an account: the answer tells nothing.
    const ghost = `ghost-${u.id}@test.example`
    const g = []
    for (let i = 0; i < 4; i++) g.push((await fromAddress('127.0.0.22', '/api/auth/password-reset/request', { email: ghost })).status)
    expect(g).toEqual([200, 200, 200, 429])
    for (let i = 0; i < 50 && (await mailCount(u.email)) < 3; i++) await new Promise((r) => setTimeout(r, 200))
    await new Promise((r) => setTimeout(r, 1000))
    expect(await mailCount(u.email)).toBe(3)
  })

  it('per network address: the 21st request in an hour answers 429, whatever the e-mail', async () => {
    const statuses = []
    for (let i = 0; i < 21; i++) statuses.push((await fromAddress('127.0.0.23', '/api/auth/password-reset/request', { email: `many-${i}-${Date.now()}@test.example` })).status)
    expect(statuses.slice(0, 20).every((s) => s === 200)).toBe(true)
    expect(statuses[20]).toBe(429)
  })
})

describe('V5.1.4: names and notes as people see them', () => {
  it('line breaks, bidi overrides and zero-width characters do not reach a stored name', async () => {
    const res = await editor.post(`/api/teams/${team.teamId}/productions`, { name: 'Harbour\r\nSigned off by: nobody\u202E\u200B', client: 'Lighthouse\u2066 Films' })
    expect(res.status).toBe(201)
    expect(res.body.name).toBe('Harbour Signed off by: nobody')
    expect(res.body.client).toBe('Lighthouse Films')
  })

  it('a note of three zero-width spaces does not count as a note', async () => {
    const reel = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Notes' })).body.id
    const up = await editor.uploadFrames(reel, [{ name: 'n.png', bytes: await png8(16, 9, 31337) }])
    const frameId = up.body.files[0]!.frameId!
    const res = await reviewer.put(`/api/frames/${frameId}/decision`, { decision: 'waived', note: '\u200B\u200B\u200B' })
    expect(res.status).toBe(400)
    expect(JSON.stringify(res.body)).toMatch(/A note is required/)
  })

  it('a file name with a bidi override is stored without it', async () => {
    const reel = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Names' })).body.id
    const up = await editor.uploadFrames(reel, [{ name: 'shot\u202Egnp.exe.png', bytes: await png8(16, 9, 31338) }])
    expect(up.body.files[0]).toMatchObject({ ok: true, name: 'shotgnp.exe.png' })
  })
})
