// Every kind of bad upload is refused (or, when only decoding can tell, failed) with its own
// reason, while the good files sent beside it are stored and analysed.
import { deflateSync } from 'node:zlib'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client } from '../support/api'
import { closeDb, createTeamWithRoles } from '../support/fixtures'
import { png8 } from '../support/images'
import { UPLOAD_LIMITS } from '../../shared/utils/uploads'

let editor: Client
let reelId: number

beforeAll(async () => {
  const team = await createTeamWithRoles()
  editor = await new Client().login(team.users.editor.email, team.users.editor.password)
  reelId = (await editor.post(`/api/productions/${team.productionId}/reels`, { name: 'Bad inputs' })).body.id
})
afterAll(closeDb)

/** A valid PNG signature and IHDR chunk claiming the given size, with a tiny (wrong) IDAT. */
function pngHeaderOnly(width: number, height: number) {
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1
    return c >>> 0
  })
  const crc = (b: Buffer) => { let c = 0xffffffff; for (const x of b) c = crcTable[(c ^ x) & 0xff]! ^ (c >>> 8); return (c ^ 0xffffffff) >>> 0 }
  const chunk = (type: string, data: Buffer) => {
    const td = Buffer.concat([Buffer.from(type, 'ascii'), data])
    const len = Buffer.alloc(4); len.writeUInt32BE(data.length)
    const c = Buffer.alloc(4); c.writeUInt32BE(crc(td))
    return Buffer.concat([len, td, c])
  }
  const ihdr = Buffer.alloc(13)
  ihdr.writeUInt32BE(width, 0); ihdr.writeUInt32BE(height, 4); ihdr[8] = 8; ihdr[9] = 2
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(Buffer.alloc(10))), chunk('IEND', Buffer.alloc(0))])
}

describe('bad uploads', () => {
  it('refuses each bad file with its own reason and keeps the good ones of the same batch', async () => {
    const good1 = await png8(96, 54, 901)
    const good2 = await png8(96, 54, 902)
    const bigPng = await sharp({ create: { width: 8000, height: 5100, channels: 3, background: '#202020' } }).png().toBuffer()
    const zip = Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.alloc(60)])
    const files = [
      { name: 'good-1.png', bytes: good1, expect: null },
      { name: 'empty.png', bytes: Buffer.alloc(0), expect: /empty/ },
      { name: 'notes.png', bytes: Buffer.from('levels looked fine to me\n'), expect: /text file/ },
      { name: 'logo.svg', bytes: Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), expect: /SVG/ },
      { name: 'page.png', bytes: Buffer.from('<!DOCTYPE html><html><body>hi</body></html>'), expect: /HTML/ },
      { name: 'bomb.png', bytes: pngHeaderOnly(60000, 60000), expect: /60000×60000.*megapixel limit/ },
      { name: 'huge.png', bytes: bigPng, expect: /8000×5100.*megapixel limit/ },
      { name: 'frames.zip', bytes: zip, expect: /ZIP archive/ },
      { name: 'still.gif', bytes: Buffer.from('GIF89a\x01\x00\x01\x00\x00\x00\x00;', 'latin1'), expect: /GIF/ },
      { name: 'sheet.pdf', bytes: Buffer.from('%PDF-1.4\n%âãÏÓ\n1 0 obj\n'), expect: /PDF/ },
      { name: '../../etc/passwd.png', bytes: good2, expect: /contains a path/ },
      { name: `${'long'.repeat(60)}.png`, bytes: good2, expect: /longer than 200/ },
      { name: 'good-2.png', bytes: good2, expect: null },
    ]
    const res = await editor.uploadFrames(reelId, files)
    expect(res.status).toBe(207)
    expect(res.body.files).toHaveLength(files.length)
    for (const [i, f] of files.entries()) {
      const got = res.body.files[i]!
      if (f.expect) {
        expect(got.ok, f.name).toBe(false)
        expect(got.reason, f.name).toMatch(f.expect)
      } else {
        expect(got.ok, `${f.name}: ${got.reason}`).toBe(true)
      }
    }
    // The reasons differ from each other: each kind is named, not a generic "bad file".
    const reasons = res.body.files.filter((f) => !f.ok).map((f) => f.reason)
    expect(new Set(reasons).size).toBe(reasons.length)
    const list = await editor.get(`/api/reels/${reelId}/frames`)
    expect(list.body.frames.map((f: { name: string }) => f.name).sort()).toEqual(['good-1.png', 'good-2.png'])
  })

  it('fails a truncated PNG and a truncated JPEG in the worker with a reason, and the rest goes on', async () => {
    const png = await png8(320, 180, 911)
    const jpeg = await sharp(await png8(320, 180, 912)).jpeg().toBuffer()
    const ok = await png8(64, 36, 913)
    const res = await editor.uploadFrames(reelId, [
      { name: 'cut.png', bytes: png.subarray(0, Math.floor(png.length / 2)) },
      { name: 'cut.jpg', bytes: jpeg.subarray(0, Math.floor(jpeg.length / 2)) },
      { name: 'fine.png', bytes: ok },
    ])
    expect(res.body.files.every((f) => f.ok)).toBe(true)
    const ids = res.body.files.map((f) => f.frameId!)
    const until = Date.now() + 60_000
    let frames: { frame: { status: string; failReason: string | null } }[] = []
    while (Date.now() < until) {
      frames = await Promise.all(ids.map((id) => editor.get(`/api/frames/${id}`).then((r) => r.body)))
      if (frames.every((f) => f.frame.status === 'done' || f.frame.status === 'failed')) break
      await new Promise((r) => setTimeout(r, 300))
    }
    expect(frames.map((f) => f.frame.status)).toEqual(['failed', 'failed', 'done'])
    expect(frames[0]!.frame.failReason).toMatch(/cannot be decoded/)
    expect(frames[1]!.frame.failReason).toMatch(/cannot be decoded/)
    // Its line plot answers 409 with the same reason, not a server error.
    const line = await editor.get(`/api/frames/${ids[0]}/line/10`)
    expect(line.status).toBe(409)
    expect(line.body.statusMessage).toMatch(/could not be measured: .*cannot be decoded/)
  })

  it('refuses raw files whose size does not match the declared width and height, or without them', async () => {
    const res = await editor.uploadFrames(reelId, [{ name: 'cap.uyvy', bytes: Buffer.alloc(720 * 486 * 2 - 2) }], '?raw=uyvy&width=720&height=486')
    expect(res.body.files[0]).toMatchObject({ ok: false, status: 422 })
    expect(res.body.files[0]!.reason).toMatch(/should be 699840 bytes; this file has 699838/)
    const noSize = await editor.uploadFrames(reelId, [{ name: 'cap.v210', bytes: Buffer.alloc(1024) }], '?raw=v210')
    expect(noSize.body.files[0]!.reason).toMatch(/needs its width and height/)
  })

  it('refuses at announcement: too large, NUL in the name, unsupported type', async () => {
    const res = await editor.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'big.png', size: UPLOAD_LIMITS.maxBytes + 1, format: 'png' }] })
    expect(res.status).toBe(400)
    expect(JSON.stringify(res.body)).toMatch(/larger than 256 MiB/)
    const nul = await editor.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'a\u0000.png', size: 100, format: 'png' }, { name: 'ok.png', size: 100, format: 'png' }] })
    expect(nul.status).toBe(200)
    expect(nul.body.files[0]).toMatchObject({ ok: false, reason: expect.stringMatching(/NUL/) })
    expect(nul.body.files[1]).toMatchObject({ ok: true })
    const type = await editor.post(`/api/reels/${reelId}/uploads`, { files: [{ name: 'clip.mov', size: 100, format: 'mov' }] })
    expect(type.status).toBe(400)
    expect(JSON.stringify(type.body)).toMatch(/Unsupported type/)
  })

  it('refuses a file over the size limit while it streams in, and stores the file sent after it in the same request', async () => {
    const good = await png8(96, 54, 921)
    // A PNG signature followed by zeros, one byte over UPLOAD_LIMITS.maxBytes (256 MiB, the
    // project's limit), made as it is sent: neither side holds it whole.
    const boundary = 'linewise-test-boundary'
    const mib = Buffer.alloc(2 ** 20)
    const part = (name: string) => Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${name}"\r\nContent-Type: image/png\r\n\r\n`)
    async function* body() {
      yield part('too-big.png')
      yield Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])
      for (let i = 0; i < UPLOAD_LIMITS.maxBytes / 2 ** 20; i++) yield mib
      yield Buffer.from('\r\n')
      yield part('after.png')
      yield good
      yield Buffer.from(`\r\n--${boundary}--\r\n`)
    }
    const res = await fetch(new URL(`/api/reels/${reelId}/frames`, process.env.LW_APP_URL), {
      // Node's fetch takes an async iterable as a streamed body (duplex: 'half'); the DOM
      // types do not say so.
      method: 'POST', body: body(), duplex: 'half',
      headers: { cookie: editor.cookieHeader(), 'content-type': `multipart/form-data; boundary=${boundary}` },
    } as unknown as RequestInit)
    expect(res.status).toBe(207)
    const { files } = await res.json()
    expect(files[0]).toEqual({ name: 'too-big.png', ok: false, status: 413, reason: 'The file is larger than 256 MiB' })
    expect(files[1]).toMatchObject({ name: 'after.png', ok: true, duplicate: false })
  })

  it(`answers files past ${UPLOAD_LIMITS.maxFilesPerRequest} in one request each with its reason`, async () => {
    const files = Array.from({ length: UPLOAD_LIMITS.maxFilesPerRequest + 1 }, (_, i) => ({ name: `note-${i}.png`, bytes: Buffer.from(`note ${i}\n`) }))
    const res = await editor.uploadFrames(reelId, files)
    expect(res.status).toBe(422)
    expect(res.body.files).toHaveLength(files.length)
    expect(res.body.files.slice(0, -1).every((f) => /text file/.test(f.reason ?? ''))).toBe(true)
    expect(res.body.files.at(-1)).toEqual({ name: `note-${UPLOAD_LIMITS.maxFilesPerRequest}.png`, ok: false, status: 413, reason: 'At most 200 files per request; send this one again in another request' })
  })

  it('refuses a multipart request without files', async () => {
    const form = new FormData()
    form.append('note', 'no file here')
    const res = await fetch(new URL(`/api/reels/${reelId}/frames`, process.env.LW_APP_URL), { method: 'POST', body: form, headers: { cookie: editor.cookieHeader() } })
    expect(res.status).toBe(400)
  })
})
