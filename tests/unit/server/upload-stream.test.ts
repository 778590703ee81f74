// The streamed multipart upload: files checked and hashed as their bytes arrive must get
// exactly the answer the whole-file checks give, whatever the chunking; the reader must
// hand over parts in order, one at a time, with their names as sent; and a body that
// breaks off must fail the part it broke in. No services: a Readable stands in for the
// request, and a local HTTP listener for S3.
import { createHash } from 'node:crypto'
import { createServer, type IncomingMessage } from 'node:http'
import type { AddressInfo } from 'node:net'
import { Readable } from 'node:stream'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { IntakeError, inspectUpload, receiveFile } from '../../../server/lib/intake'
import { MultipartError, isMultipart, readMultipart } from '../../../server/lib/multipart'
import { Storage } from '../../../server/lib/storage'
import { UPLOAD_LIMITS, type FrameFormat } from '../../../shared/utils/uploads'

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex')

/** `bytes` in pieces of `size`, as a socket would deliver them. */
async function* pieces(bytes: Uint8Array, size: number) {
  for (let i = 0; i < bytes.length; i += size) yield bytes.subarray(i, i + size)
}

const refusal = (p: Promise<unknown>) => p.then(() => null, (e) => {
  if (!(e instanceof IntakeError)) throw e
  return { status: e.status, reason: e.reason }
})

async function samples() {
  const png = await sharp({ create: { width: 64, height: 36, channels: 3, background: '#406080' } }).png().toBuffer()
  const jpeg = await sharp(png).jpeg().toBuffer()
  return { png, jpeg }
}

describe('receiveFile', () => {
  it('gives the same answer as the whole-file checks, in pieces of 1, 7, 512 and 65536 bytes', async () => {
    const { png, jpeg } = await samples()
    const cases: { name: string; bytes: Uint8Array; format: FrameFormat; rawWidth?: number; rawHeight?: number }[] = [
      { name: 'a.png', bytes: png, format: 'png' },
      { name: 'a.jpg', bytes: jpeg, format: 'jpeg' },
      { name: 'cut.png', bytes: png.subarray(0, png.length >> 1), format: 'png' },
      { name: 'empty.png', bytes: new Uint8Array(0), format: 'png' },
      { name: 'notes.png', bytes: Buffer.from('levels looked fine to me\n'), format: 'png' },
      { name: 'tiny.png', bytes: Buffer.from([0x89, 0x50]), format: 'png' },
      { name: 'logo.png', bytes: Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"></svg>'), format: 'png' },
      { name: 'a.zip', bytes: Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.alloc(600)]), format: 'png' },
      // 8×2 UYVY is 8 × 2 × 2 = 32 bytes (computed: two bytes a pixel).
      { name: 'ok.uyvy', bytes: Buffer.alloc(32, 0x80), format: 'uyvy', rawWidth: 8, rawHeight: 2 },
      { name: 'short.uyvy', bytes: Buffer.alloc(30, 0x80), format: 'uyvy', rawWidth: 8, rawHeight: 2 },
      { name: 'long.uyvy', bytes: Buffer.alloc(700, 0x80), format: 'uyvy', rawWidth: 8, rawHeight: 2 },
      { name: 'nosize.v210', bytes: Buffer.alloc(1024), format: 'v210' },
      { name: 'huge.uyvy', bytes: Buffer.alloc(64), format: 'uyvy', rawWidth: 16384, rawHeight: 16384 },
      { name: 'png.uyvy', bytes: Buffer.concat([png, Buffer.alloc(64 * 36 * 2 - png.length)]), format: 'uyvy', rawWidth: 64, rawHeight: 36 },
    ]
    for (const c of cases) {
      const declared = { format: c.format, rawWidth: c.rawWidth, rawHeight: c.rawHeight }
      const whole = await refusal(inspectUpload(c.bytes, declared))
      for (const size of [1, 7, 512, 65536]) {
        const got = receiveFile(pieces(c.bytes, size), { name: c.name, ...declared })
        if (whole) {
          expect(await refusal(got), `${c.name} in pieces of ${size}`).toEqual(whole)
        } else {
          const r = await got
          expect(r.name).toBe(c.name)
          expect(Buffer.from(r.bytes).equals(Buffer.from(c.bytes)), c.name).toBe(true)
          // Computed: node:crypto over the whole file.
          expect(r.sha256).toBe(sha256(c.bytes))
          expect(r.inspected).toEqual(await inspectUpload(c.bytes, declared))
        }
      }
    }
  })

  it('refuses a file over the size limit by its size, and a bad name before reading, reading both to their end', async () => {
    // One MiB block repeated: the stream is larger than UPLOAD_LIMITS.maxBytes (256 MiB, the
    // project's own limit) without that much memory behind it.
    const block = Buffer.alloc(2 ** 20)
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]).copy(block)
    let sent = 0
    async function* tooLarge() {
      for (let i = 0; i <= UPLOAD_LIMITS.maxBytes / 2 ** 20; i++) { sent++; yield block }
    }
    expect(await refusal(receiveFile(tooLarge(), { name: 'big.png', format: 'png' }))).toEqual({ status: 413, reason: 'The file is larger than 256 MiB' })
    expect(sent).toBe(257)

    let read = 0
    async function* counted() { for (let i = 0; i < 3; i++) { read++; yield block } }
    expect(await refusal(receiveFile(counted(), { name: '../../etc/passwd.png', format: 'png' })))
      .toEqual({ status: 400, reason: 'The file name "../../etc/passwd.png" contains a path; send the file name only' })
    expect(read).toBe(3)
  })

  it('refuses a file whose bytes stop with an error (the body broke off)', async () => {
    const { png } = await samples()
    async function* broken() {
      yield png.subarray(0, 100)
      throw new Error('Unexpected end of form')
    }
    expect(await refusal(receiveFile(broken(), { name: 'a.png', format: 'png' })))
      .toEqual({ status: 400, reason: 'The request ended before this file was complete; send it again' })
  })
})

/** A multipart body as undici's FormData encodes it, delivered in pieces through a stand-in request. */
async function request(form: FormData, piece = 4096, cut?: number) {
  const res = new Response(form)
  let body = Buffer.from(await res.arrayBuffer())
  if (cut !== undefined) body = body.subarray(0, cut)
  const req = Readable.from(pieces(body, piece)) as unknown as IncomingMessage
  req.headers = { 'content-type': res.headers.get('content-type')! }
  return { req, body }
}

async function collect(req: IncomingMessage, slow = false) {
  const got: { field: string; filename: string; bytes: Buffer }[] = []
  let active = 0
  let most = 0
  await readMultipart(req, async ({ field, filename, stream }) => {
    most = Math.max(most, ++active)
    const chunks: Buffer[] = []
    for await (const c of stream) chunks.push(c)
    if (slow) await new Promise((r) => setTimeout(r, 5))
    got.push({ field, filename, bytes: Buffer.concat(chunks) })
    active--
  })
  return { got, most }
}

describe('readMultipart', () => {
  it('hands over every file in order, one at a time, with its name as sent, and skips text fields', async () => {
    const { png, jpeg } = await samples()
    const form = new FormData()
    form.append('note', 'not a file')
    form.append('file', new Blob([png]), 'Überblendung é.png')
    form.append('file', new Blob([jpeg]), '../../etc/passwd.png')
    form.append('other', new Blob([Buffer.from('x;y')]), 'a;b=c.png')
    for (const piece of [1000, 65536]) {
      const { got, most } = await collect((await request(form, piece)).req, true)
      expect(got.map((g) => [g.field, g.filename])).toEqual([['file', 'Überblendung é.png'], ['file', '../../etc/passwd.png'], ['other', 'a;b=c.png']])
      expect(got.map((g) => sha256(g.bytes))).toEqual([sha256(png), sha256(jpeg), sha256(Buffer.from('x;y'))])
      expect(most).toBe(1)
    }
  })

  it('fails the part a body breaks off in, after the parts before it', async () => {
    const { png, jpeg } = await samples()
    const form = new FormData()
    form.append('file', new Blob([png]), 'one.png')
    form.append('file', new Blob([jpeg]), 'two.jpg')
    const whole = (await request(form)).body
    // Cut in the middle of the second file's bytes (found by its position in the body).
    const second = whole.indexOf(jpeg.subarray(0, 64))
    const { req } = await request(form, 4096, second + (jpeg.length >> 1))
    const seen: { filename: string; outcome: string }[] = []
    const done = readMultipart(req, async ({ filename, stream }) => {
      seen.push({ filename, outcome: await receiveFile(stream, { name: filename, format: 'png' }).then((r) => `ok ${r.sha256}`, (e: IntakeError) => e.reason) })
    })
    await expect(done).rejects.toBeInstanceOf(MultipartError)
    expect(seen).toEqual([
      { filename: 'one.png', outcome: `ok ${sha256(png)}` },
      { filename: 'two.jpg', outcome: 'The request ended before this file was complete; send it again' },
    ])
  })

  it('when the handler fails, rejects with its error, gives no further part and reads the body to its end', async () => {
    const { png } = await samples()
    const form = new FormData()
    for (let i = 0; i < 4; i++) form.append('file', new Blob([png, Buffer.from([i])]), `f${i}.png`)
    const { req } = await request(form, 1024)
    const names: string[] = []
    const done = readMultipart(req, async ({ filename, stream }) => {
      names.push(filename)
      for await (const _ of stream) throw new Error('storage is down')
    })
    await expect(done).rejects.toThrow('storage is down')
    expect(names).toEqual(['f0.png'])
    if (!req.readableEnded) await new Promise((r) => req.once('end', r))
    expect(req.readableEnded).toBe(true)
  })

  it('refuses what is not multipart/form-data', async () => {
    expect(isMultipart('multipart/form-data; boundary=x')).toBe(true)
    expect(isMultipart('application/x-www-form-urlencoded')).toBe(false)
    expect(isMultipart(undefined)).toBe(false)
    const req = Readable.from([Buffer.from('a=b')]) as unknown as IncomingMessage
    req.headers = { 'content-type': 'multipart/form-data' }
    await expect(readMultipart(req, async () => {})).rejects.toThrow(/Boundary not found/)
  })
})

describe('Storage.put', () => {
  it('signs the body with the SHA-256 the caller gives, the same value the SDK computes itself', async () => {
    const seen: string[] = []
    const server = createServer((req, res) => {
      seen.push(String(req.headers['x-amz-content-sha256']))
      req.resume()
      req.on('end', () => res.end())
    })
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r))
    try {
      const storage = new Storage({ endpoint: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, region: 'us-east-1', bucket: 'b', accessKeyId: 'k', secretAccessKey: 's' })
      const body = Buffer.from('a frame, or anything')
      await storage.put('x', body, 'image/png')
      await storage.put('x', body, 'image/png', sha256(body))
      await storage.put('x', body, 'image/png', 'f'.repeat(64))
      // Computed: node:crypto over the body; the third shows the given value is the one sent.
      expect(seen).toEqual([sha256(body), sha256(body), 'f'.repeat(64)])
    } finally {
      server.close()
    }
  })
})
