// Sign-off and the pass/fail sheet over HTTP, with the real worker making the PDF and CSV:
// what blocks a sign-off, who may sign, the read-only lock, the mails, the sheet's contents
// against the database, and reopening.
import { and, asc, eq } from 'drizzle-orm'
import { parse } from 'csv-parse/sync'
import { PDFParse } from 'pdf-parse'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ENGINE_VERSION } from '../../shared/engine/index'
import * as t from '../../server/db/schema'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles, db } from '../support/fixtures'
import { png8 } from '../support/images'
import { linkIn, waitForMail } from '../support/mail'
import { APP_URL } from '../support/env'

let team: Awaited<ReturnType<typeof createTeamWithRoles>>
const c = {} as Record<'owner' | 'editor' | 'reviewer' | 'producer', Client>
let reelId: number
let ids: number[]
let signoffId: number

async function waitAnalysed(frameIds: number[]) {
  for (let i = 0; i < 240; i++) {
    const rows = await db().select({ status: t.frames.status }).from(t.frames).where(eq(t.frames.reelId, reelId))
    if (rows.length === frameIds.length && rows.every((r) => r.status === 'done' || r.status === 'failed')) return
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error('frames not analysed in time')
}

async function download(client: Client, path: string) {
  for (let i = 0; i < 120; i++) {
    const res = await fetch(new URL(path, APP_URL()), { headers: { cookie: client.cookieHeader() } })
    if (res.status !== 202) return { status: res.status, headers: res.headers, bytes: new Uint8Array(await res.arrayBuffer()) }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`${path} still being prepared`)
}

beforeAll(async () => {
  team = await createTeamWithRoles()
  for (const role of ['owner', 'editor', 'reviewer', 'producer'] as const) c[role] = await new Client().login(team.users[role].email, team.users[role].password)
  reelId = (await c.editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Day 2 — Camera B', sourceLabel: 'Camera B' })).body.id
  // Mid grey passes the NTSC spec; the test pattern's 100 % yellow and cyan patches reach
  // +130.8 IRE composite (SMPTE EG 1 100 % bars with setup — memory; computed), beyond the +120 IRE limit, so those fail.
  const grey = await sharp({ create: { width: 64, height: 36, channels: 3, background: { r: 128, g: 128, b: 128 } } }).png().toBuffer()
  const cut = await png8(320, 180, 5151)
  const up = await c.editor.uploadFrames(reelId, [
    { name: 'grey.png', bytes: grey },
    { name: 'hot1.png', bytes: await png8(64, 36, 5101) },
    { name: 'hot2.png', bytes: await png8(64, 36, 5102) },
    { name: 'cut.png', bytes: cut.subarray(0, Math.floor(cut.length / 2)) },
  ])
  ids = up.body.files.map((f) => f.frameId!)
  await waitAnalysed(ids)
})
afterAll(closeDb)

describe('sign-off', () => {
  it('the frames were measured as the test expects (grey pass, patterns fail, the cut file not decoded)', async () => {
    const rows = await db().select({ status: t.frames.status, verdict: t.analyses.verdict }).from(t.frames)
      .leftJoin(t.analyses, eq(t.analyses.frameId, t.frames.id)).where(eq(t.frames.reelId, reelId)).orderBy(asc(t.frames.seq))
    expect(rows).toEqual([{ status: 'done', verdict: 'pass' }, { status: 'done', verdict: 'fail' }, { status: 'done', verdict: 'fail' }, { status: 'failed', verdict: null }])
  })

  it('is refused while a frame is analysing, naming it, the undecided failing frames and the undecodable one', async () => {
    await db().update(t.frames).set({ status: 'analysing' }).where(eq(t.frames.id, ids[0]!))
    try {
      const res = await c.reviewer.post(`/api/reels/${reelId}/signoff`)
      expect(res.status).toBe(409)
      expect(res.body.statusMessage).toBe('This reel cannot be signed off yet: 1 frame still analysing: #1 grey.png; '
        + '1 frame could not be measured (the file did not decode) and is not rejected: #4 cut.png; 2 failing frames have no decision: #2 hot1.png, #3 hot2.png')
      expect(res.body.data.blockers.map((b: { code: string }) => b.code)).toEqual(['pending', 'undecodable', 'undecided-fail'])
    } finally {
      await db().update(t.frames).set({ status: 'done' }).where(eq(t.frames.id, ids[0]!))
    }
    const sheet = await c.editor.get(`/api/reels/${reelId}/sheet`)
    expect(sheet.body.blockers.map((b: { code: string }) => b.code)).toEqual(['undecodable', 'undecided-fail'])
  })

  it('editors and producers cannot sign off', async () => {
    const byEditor = await c.editor.post(`/api/reels/${reelId}/signoff`)
    expect(byEditor.status).toBe(403)
    expect(byEditor.body.statusMessage).toMatch(/Editor/)
    expect((await c.producer.post(`/api/reels/${reelId}/signoff`)).status).toBe(403)
  })

  it('an undecodable frame can be rejected but not waived; one rejection batch sends the uploader one mail listing the frames and the note', async () => {
    const waive = await c.reviewer.request('PUT', `/api/frames/${ids[3]}/decision`, { decision: 'waived', note: 'looks fine' })
    expect(waive.status).toBe(409)
    expect(waive.body.statusMessage).toMatch(/could not be decoded.*reject it/)
    expect((await c.reviewer.request('PUT', `/api/frames/${ids[1]}/decision`, { decision: 'waived', note: 'Specular glint on the harbour rail' })).status).toBe(200)
    const bulk = await c.reviewer.post(`/api/reels/${reelId}/decisions`, { frameIds: [ids[2], ids[3]], decision: 'rejected', note: 'Yellow patch over 120 IRE; re-export' })
    expect(bulk.body).toEqual({ updated: 2, notAnalysed: [] })
    const mail = await waitForMail(team.users.editor.email, /2 frames were rejected/)
    expect(mail.subject).toMatch(/Day 2 — Camera B$/)
    expect(mail.text).toContain('#3 hot2.png, #4 cut.png')
    expect(mail.text).toContain('Note: Yellow patch over 120 IRE; re-export')
    expect(mail.text).toContain('Test reviewer rejected 2 frames you uploaded')
    expect(linkIn(mail, `/reels/${reelId}`)).toBe(`${APP_URL()}/reels/${reelId}`)
  })

  it('a reviewer signs off; who, when, the spec and the engine are recorded; producers are mailed a link to the sheet page', async () => {
    const res = await c.reviewer.post(`/api/reels/${reelId}/signoff`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    signoffId = res.body.signoffId
    expect(res.body.summary).toMatchObject({ overall: 'fail', because: '2 frames rejected', verdicts: { pass: 1, fail: 2, notMeasured: 1 }, decisions: { waived: 1, rejected: 2, none: 1 } })
    const [row] = await db().select().from(t.signoffs).where(eq(t.signoffs.id, signoffId))
    expect(row).toMatchObject({ reelId, signedBy: team.users.reviewer.id, signerName: 'Test reviewer', specName: 'ntsc-setup', specVersion: 1, engineVersion: ENGINE_VERSION })
    expect((row!.specBody as { limits: unknown[] }).limits).toHaveLength(4)
    const [reel] = await db().select().from(t.reels).where(eq(t.reels.id, reelId))
    expect(reel!.signedBy).toBe(team.users.reviewer.id)
    const [log] = await db().select().from(t.auditLog).where(and(eq(t.auditLog.action, 'reel.signed_off'), eq(t.auditLog.subjectId, reelId)))
    expect(log).toMatchObject({ actorId: team.users.reviewer.id, details: { signoffId, overall: 'fail', frames: 4 } })
    const mail = await waitForMail(team.users.producer.email, /^Signed off: /)
    expect(mail.text).toContain('Overall result: FAIL (2 frames rejected; 4 frames)')
    expect(linkIn(mail, `/sheets/${reelId}`)).toBe(`${APP_URL()}/sheets/${reelId}`)
  })

  it('a signed reel refuses uploads, decisions, edits and a second sign-off (409)', async () => {
    const up = await c.editor.uploadFrames(reelId, [{ name: 'late.png', bytes: await png8(32, 18, 5199) }])
    expect(up.status).toBe(409)
    expect(up.body.statusMessage).toMatch(/signed off and read-only/)
    expect((await c.reviewer.request('PUT', `/api/frames/${ids[0]}/decision`, { decision: 'accepted' })).status).toBe(409)
    expect((await c.reviewer.delete(`/api/frames/${ids[1]}/decision`)).status).toBe(409)
    expect((await c.editor.patch(`/api/reels/${reelId}`, { sourceLabel: 'Camera C' })).status).toBe(409)
    const again = await c.owner.post(`/api/reels/${reelId}/signoff`)
    expect(again.status).toBe(409)
    expect(again.body.statusMessage).toMatch(/already signed off by Test reviewer/)
  })
})

describe('the sheet', () => {
  it('the PDF holds the production, the spec thresholds, each frame\'s values and verdict, the decisions and the signer', async () => {
    const res = await download(c.producer, `/api/reels/${reelId}/sheet.pdf`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('application/pdf')
    expect(new TextDecoder().decode(res.bytes.subarray(0, 5))).toBe('%PDF-')
    const parser = new PDFParse({ data: res.bytes })
    const text = (await parser.getText()).text.replace(/\s+/g, ' ')
    await parser.destroy()
    const [production] = await db().select().from(t.productions).where(eq(t.productions.id, team.productionId))
    expect(text).toContain(production!.name)
    expect(text).toContain('Day 2 — Camera B')
    // The NTSC spec's thresholds (ITU-R BT.1700 +120 IRE peak; −20 IRE NTSC practice) and the caution point of +120 IRE less its 5 IRE margin.
    for (const s of ['7.5 IRE', '100 IRE', '-20 IRE', '120 IRE', '115 IRE', 'ITU-R BT.1700', 'version 1']) expect(text, s).toContain(s)
    const frames = await db().select({ name: t.frames.name, a: t.analyses }).from(t.frames)
      .leftJoin(t.analyses, eq(t.analyses.frameId, t.frames.id)).where(eq(t.frames.reelId, reelId)).orderBy(asc(t.frames.seq))
    for (const f of frames) {
      expect(text).toContain(f.name)
      if (!f.a) continue
      for (const v of [f.a.lumaMinIre, f.a.lumaMaxIre, f.a.compMaxIre]) expect(text, `${f.name} ${v}`).toContain(v.toFixed(1))
    }
    expect(text.match(/\bFAIL\b/g)!.length).toBeGreaterThanOrEqual(3) // overall + two frames
    expect(text).toContain('PASS')
    expect(text).toContain('NOT MEASURED')
    expect(text).toContain('Specular glint on the harbour rail')
    expect(text).toContain('Yellow patch over 120 IRE; re-export')
    expect(text).toContain(`sign-off #${signoffId} by Test reviewer`)
    expect(text).toContain(`Linewise engine ${ENGINE_VERSION}`)
    expect(text).toContain('take precedence over this sheet')
    // Scope pages for the waived hot1 and the rejected hot2 (the undecodable frame has no scopes).
    expect(text).toContain('Frame #2 — hot1.png')
    expect(text).toContain('Frame #3 — hot2.png')
    expect(text).not.toContain('Frame #4 —')
  })

  it('the CSV parses and equals the database rows', async () => {
    const res = await download(c.reviewer, `/api/reels/${reelId}/sheet.csv`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8')
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename=".*sign-off-\d+\.csv"/)
    const records = parse(new TextDecoder().decode(res.bytes), { columns: true, bom: true }) as Record<string, string>[]
    const rows = await db().select({ f: t.frames, a: t.analyses, d: t.decisions }).from(t.frames)
      .leftJoin(t.analyses, eq(t.analyses.frameId, t.frames.id)).leftJoin(t.decisions, eq(t.decisions.frameId, t.frames.id))
      .where(eq(t.frames.reelId, reelId)).orderBy(asc(t.frames.seq))
    expect(records).toHaveLength(rows.length)
    const fixed = (v: number | undefined, d: number) => (v === undefined ? '' : v.toFixed(d))
    records.forEach((r, i) => {
      const { f, a, d } = rows[i]!
      expect(r).toMatchObject({
        index: String(f.seq), name: f.name, status: f.status === 'failed' ? 'not measured' : f.status,
        luma_min_ire: fixed(a?.lumaMinIre, 2), luma_max_ire: fixed(a?.lumaMaxIre, 2), composite_max_ire: fixed(a?.compMaxIre, 2),
        out_of_range_pct: a ? (a.outShare * 100).toFixed(4) : '', verdict: a?.verdict ?? '', decision: d?.decision ?? '', note: d?.note ?? '',
        spec: a?.specName ?? '', engine_version: a?.engineVersion ?? '',
      })
    })
  })

  it('editors get 403, another team 404, a reel never signed 409', async () => {
    const byEditor = await c.editor.get(`/api/reels/${reelId}/sheet.pdf`)
    expect(byEditor.status).toBe(403)
    expect(byEditor.body.statusMessage).toMatch(/Editor/)
    const other = await createTeamWithRoles()
    const outsider = await new Client().login(other.users.producer.email, other.users.producer.password)
    expect((await outsider.get(`/api/reels/${reelId}/sheet.pdf`)).status).toBe(404)
    expect((await outsider.get(`/api/reels/${reelId}/sheet.csv`)).status).toBe(404)
    const fresh = (await c.editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Unsigned' })).body.id
    const unsigned = await c.producer.get(`/api/reels/${fresh}/sheet.csv`)
    expect(unsigned.status).toBe(409)
    expect(unsigned.body.statusMessage).toMatch(/not signed off/)
  })
})

describe('reopening', () => {
  it('only an owner reopens, with a reason; the old sheet stays, marked superseded; the reel takes changes again', async () => {
    expect((await c.reviewer.post(`/api/reels/${reelId}/reopen`, { reason: 'Network changed the spec' })).status).toBe(403)
    const noReason = await c.owner.post(`/api/reels/${reelId}/reopen`, {})
    expect(noReason.status).toBe(400)
    const res = await c.owner.post(`/api/reels/${reelId}/reopen`, { reason: 'Regrade of the hot shots' })
    expect(res.status).toBe(200)
    expect(res.body.supersededSignoffId).toBe(signoffId)
    const [log] = await db().select().from(t.auditLog).where(and(eq(t.auditLog.action, 'reel.reopened'), eq(t.auditLog.subjectId, reelId)))
    expect(log).toMatchObject({ actorId: team.users.owner.id, details: { signoffId, reason: 'Regrade of the hot shots' } })
    expect((await c.producer.get(`/api/reels/${reelId}/sheet.pdf`)).status).toBe(409)
    const old = await download(c.producer, `/api/reels/${reelId}/sheet.pdf?signoff=${signoffId}&download=1`)
    expect(old.status).toBe(200)
    expect(old.headers.get('x-linewise-superseded')).toBe('yes')
    expect(old.headers.get('content-disposition')).toMatch(/^attachment; filename=".*superseded\.pdf"/)
    const sheet = await c.producer.get(`/api/reels/${reelId}/sheet`)
    expect(sheet.body.signoff).toBeNull()
    expect(sheet.body.history[0]).toMatchObject({ id: signoffId, reopenReason: 'Regrade of the hot shots', reopenedBy: 'Test owner' })
    expect((await c.owner.post(`/api/reels/${reelId}/reopen`, { reason: 'again' })).status).toBe(409)
    const up = await c.editor.uploadFrames(reelId, [{ name: 'regraded.png', bytes: await png8(32, 18, 5200) }])
    expect(up.status).toBe(201)
  })
})
