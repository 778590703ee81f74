// Node-side decoding (sharp, raw files) and the command line. Pictures are written by
// Debian's ffmpeg (5.1.9-0+deb12u1) from raw data we make, into a temporary directory, so
// the codes that come back can be checked against the codes that went in.
import { execFile } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import sharp from 'sharp'
import { afterAll, describe, expect, it } from 'vitest'
import { decodeFile, DecodeFileError, MAX_INPUT_PIXELS } from '../../../server/lib/decode-file'
import { packV210 } from '../../../shared/engine/index'
import { ffmpeg } from './ffmpeg'

const dir = mkdtempSync(join(tmpdir(), 'linewise-engine-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

const W = 64; const H = 16

/** A ramp in 16-bit R'G'B': red rises across, green down the rows, blue fixed. */
function ramp16(): Uint16Array {
  const d = new Uint16Array(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const i = (y * W + x) * 3
      d[i] = x * 1040 + 7; d[i + 1] = y * 4000 + 3; d[i + 2] = 40000
    }
  }
  return d
}

function writeWithFfmpeg(raw: Uint8Array, inFmt: string, file: string, extra: string[]): string {
  const path = join(dir, file)
  ffmpeg(['-f', 'rawvideo', '-pix_fmt', inFmt, '-s', `${W}x${H}`, '-i', '-', '-frames:v', '1', ...extra, '-y', path], raw)
  return path
}

describe('decodeFile', () => {
  it('keeps every 16-bit code of a 16-bit PNG (sharp 0.35: rgb16 pipeline)', async () => {
    const src = ramp16()
    const path = writeWithFfmpeg(new Uint8Array(src.buffer), 'rgb48le', 'ramp16.png', ['-pix_fmt', 'rgb48be'])
    const input = await decodeFile(path)
    expect(input.kind).toBe('rgb')
    if (input.kind !== 'rgb') return
    expect(input.bitDepth).toBe(16)
    expect(input.channels).toBe(3)
    expect(Array.from(input.data)).toEqual(Array.from(src))
  })

  it('keeps every 16-bit code of a 16-bit TIFF', async () => {
    const src = ramp16()
    const path = writeWithFfmpeg(new Uint8Array(src.buffer), 'rgb48le', 'ramp16.tif', ['-pix_fmt', 'rgb48le'])
    const input = await decodeFile(path, { range: 'studio' })
    if (input.kind !== 'rgb') throw new Error('expected RGB')
    expect(input.bitDepth).toBe(16)
    expect(input.range).toBe('studio')
    expect(Array.from(input.data)).toEqual(Array.from(src))
  })

  it('reads 8-bit PNG and lossless WebP exactly, JPEG within its compression error', async () => {
    const src = new Uint8Array(W * H * 3)
    for (let i = 0; i < src.length; i++) src[i] = (i * 37) % 256 < 128 ? 60 : 200
    for (let i = 0; i < W * H; i++) { src[i * 3] = i % W * 4; src[i * 3 + 1] = 128; src[i * 3 + 2] = 90 }
    for (const [file, extra] of [['p8.png', []], ['p8.webp', ['-c:v', 'libwebp', '-lossless', '1']]] as const) {
      const input = await decodeFile(writeWithFfmpeg(src, 'rgb24', file, [...extra]))
      if (input.kind !== 'rgb') throw new Error('expected RGB')
      expect(input.bitDepth).toBe(8)
      expect(Array.from(input.data)).toEqual(Array.from(src))
    }
    const jpeg = await decodeFile(writeWithFfmpeg(src, 'rgb24', 'p8.jpg', ['-q:v', '2', '-pix_fmt', 'yuvj444p']))
    if (jpeg.kind !== 'rgb') throw new Error('expected RGB')
    let err = 0
    for (let i = 0; i < src.length; i++) err += Math.abs(jpeg.data[i]! - src[i]!)
    expect(err / src.length).toBeLessThan(4)
  })

  it('reads raw UYVY and v210 with the given size, refusing a wrong size', async () => {
    const uyvy = join(dir, 'f.uyvy')
    writeFileSync(uyvy, new Uint8Array(W * H * 2).fill(128))
    await expect(decodeFile(uyvy, { raw: 'uyvy', width: W, height: H })).resolves.toMatchObject({ kind: 'uyvy', width: W, height: H })
    await expect(decodeFile(uyvy, { raw: 'uyvy', width: W, height: H + 1 })).rejects.toThrow(/should be 2176 bytes, the file has 2048/)
    const v210 = join(dir, 'f.v210')
    writeFileSync(v210, packV210(new Array(W * H).fill(1000), new Array(W * H / 2).fill(512), new Array(W * H / 2).fill(512), W, H))
    await expect(decodeFile(v210, { raw: 'v210', width: W, height: H })).resolves.toMatchObject({ kind: 'v210' })
    await expect(decodeFile(v210, { raw: 'v210' })).rejects.toThrow(DecodeFileError)
  })

  it('refuses unreadable, unsupported and oversized pictures with a clear message', async () => {
    const junk = join(dir, 'junk.png')
    writeFileSync(junk, 'not a picture at all')
    await expect(decodeFile(junk)).rejects.toThrow(/not a readable picture/)
    await expect(decodeFile(join(dir, 'missing.png'))).rejects.toThrow(/cannot read .*ENOENT/)
    const gif = writeWithFfmpeg(new Uint8Array(W * H * 3), 'rgb24', 'x.gif', [])
    await expect(decodeFile(gif)).rejects.toThrow(/unsupported format gif/)
    const png = writeWithFfmpeg(new Uint8Array(W * H * 3), 'rgb24', 'small.png', [])
    await expect(decodeFile(png, { maxPixels: W * H - 1 })).rejects.toThrow(DecodeFileError)
    expect(MAX_INPUT_PIXELS).toBeGreaterThanOrEqual(7680 * 4320)
  })
})

/**
 * The chunk bytes (length, type, data, CRC) of a PNG's iCCP chunk (PNG spec §11.3.3.3: the
 * embedded ICC profile), or undefined.
 */
function iccpChunk(png: Uint8Array): Uint8Array | undefined {
  const dv = new DataView(png.buffer, png.byteOffset, png.length)
  for (let o = 8; o + 8 <= png.length;) {
    const len = dv.getUint32(o)
    const type = String.fromCharCode(...png.subarray(o + 4, o + 8))
    if (type === 'iCCP') return png.slice(o, o + 12 + len)
    o += 12 + len
  }
  return undefined
}

/** The PNG with an iCCP chunk put right after IHDR (which the spec requires to come first). */
function withChunk(png: Uint8Array, chunk: Uint8Array): Uint8Array {
  const ihdrEnd = 8 + 12 + new DataView(png.buffer, png.byteOffset).getUint32(8)
  const out = new Uint8Array(png.length + chunk.length)
  out.set(png.subarray(0, ihdrEnd)); out.set(chunk, ihdrEnd); out.set(png.subarray(ihdrEnd), ihdrEnd + chunk.length)
  return out
}

describe('decodeFile: colour profiles and colour models', () => {
  // Codes across the range, with saturated primaries where a P3 → sRGB conversion moves them most.
  const src8 = new Uint8Array(W * H * 3)
  for (let i = 0; i < W * H; i++) { src8[i * 3] = (i * 7) % 256; src8[i * 3 + 1] = i % 3 ? 0 : 255; src8[i * 3 + 2] = (i * 13) % 256 }

  async function p3Chunk(): Promise<Uint8Array> {
    // libvips's built-in Display P3 profile, attached by sharp; only its iCCP chunk is kept.
    const png = await sharp(Buffer.from(src8), { raw: { width: W, height: H, channels: 3 } }).withIccProfile('p3').png().toBuffer()
    const chunk = iccpChunk(png)
    if (!chunk) throw new Error('sharp wrote no iCCP chunk')
    return chunk
  }

  it('an 8-bit PNG with a Display P3 profile decodes to the codes as written, not colour-managed ones', async () => {
    const plain = readFileSync(writeWithFfmpeg(src8, 'rgb24', 'plain8.png', []))
    const path = join(dir, 'p3-8.png')
    writeFileSync(path, withChunk(plain, await p3Chunk()))
    expect((await sharp(path).metadata()).hasProfile).toBe(true)
    // The check can fail: a colour-managed decode of this file moves the codes.
    const managed = await sharp(path).toColourspace('srgb').raw().toBuffer()
    expect(Buffer.compare(managed, Buffer.from(src8))).not.toBe(0)
    const input = await decodeFile(path)
    if (input.kind !== 'rgb') throw new Error('expected RGB')
    expect(input.bitDepth).toBe(8)
    expect(Array.from(input.data)).toEqual(Array.from(src8))
  })

  it('a 16-bit PNG with a Display P3 profile decodes to the codes as written', async () => {
    const src = ramp16()
    const plain = readFileSync(writeWithFfmpeg(new Uint8Array(src.buffer), 'rgb48le', 'plain16.png', ['-pix_fmt', 'rgb48be']))
    const path = join(dir, 'p3-16.png')
    writeFileSync(path, withChunk(plain, await p3Chunk()))
    expect((await sharp(path).metadata()).hasProfile).toBe(true)
    const input = await decodeFile(path)
    if (input.kind !== 'rgb') throw new Error('expected RGB')
    expect(input.bitDepth).toBe(16)
    expect(Array.from(input.data)).toEqual(Array.from(src))
  })

  it('greyscale stills are measured as R\' = G\' = B\' = the grey code, at 8 and 16 bits', async () => {
    const grey8 = new Uint8Array(W * H).map((_, i) => (i * 5) % 256)
    const g8 = await decodeFile(writeWithFfmpeg(grey8, 'gray', 'grey8.png', []))
    if (g8.kind !== 'rgb') throw new Error('expected RGB')
    expect(g8.bitDepth).toBe(8)
    expect(Array.from(g8.data)).toEqual(Array.from(grey8).flatMap(v => [v, v, v]))
    const grey16 = new Uint16Array(W * H).map((_, i) => (i * 1031) % 65536)
    const g16 = await decodeFile(writeWithFfmpeg(new Uint8Array(grey16.buffer), 'gray16le', 'grey16.png', ['-pix_fmt', 'gray16be']))
    if (g16.kind !== 'rgb') throw new Error('expected RGB')
    expect(g16.bitDepth).toBe(16)
    expect(Array.from(g16.data)).toEqual(Array.from(grey16).flatMap(v => [v, v, v]))
  })

  it('refuses CMYK stills with the reason', async () => {
    const path = join(dir, 'cmyk.jpg')
    await sharp(Buffer.from(src8), { raw: { width: W, height: H, channels: 3 } }).toColourspace('cmyk').jpeg().toFile(path)
    expect((await sharp(path).metadata()).space).toBe('cmyk')
    const err = await decodeFile(path).catch((e: unknown) => e)
    expect(err).toBeInstanceOf(DecodeFileError)
    expect((err as Error).message).toMatch(/CMYK/)
  })
})

const run = promisify(execFile)
const CLI = ['--import', 'tsx', 'server/cli/analyse.ts']

async function cli(args: string[]): Promise<{ code: number, stdout: string, stderr: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, [...CLI, ...args], { cwd: join(__dirname, '../../..') })
    return { code: 0, stdout, stderr }
  }
  catch (e) {
    const err = e as { code: number, stdout: string, stderr: string }
    return { code: err.code, stdout: err.stdout, stderr: err.stderr }
  }
}

describe('analyse command line', () => {
  it('prints the JSON fields, with a line plot, for ffmpeg\'s SD bars as UYVY', async () => {
    const path = join(dir, 'bars.uyvy')
    writeFileSync(path, ffmpeg(['-f', 'lavfi', '-i', 'smptebars=s=720x486', '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', 'uyvy422', '-']))
    const r = await cli([path, '--raw', 'uyvy', '--width', '720', '--height', '486', '--line', '100', '--json'])
    expect(r.code).toBe(0)
    const j = JSON.parse(r.stdout)
    for (const k of ['width', 'height', 'bitDepth', 'matrix', 'range', 'luma', 'lumaIre', 'compositeIre', 'chroma', 'shares', 'verdict', 'reasons', 'line']) expect(j).toHaveProperty(k)
    expect(Object.keys(j.luma)).toEqual(['min', 'p1', 'p10', 'p50', 'mean', 'p90', 'p99', 'max'])
    expect(Object.keys(j.chroma)).toEqual(['cbMin', 'cbMax', 'crMin', 'crMax', 'ppMaxIre'])
    for (const k of ['belowBlack', 'aboveWhite', 'compositeOut', 'gamutOut', 'clipped', 'crushed']) expect(typeof j.shares[k]).toBe('number')
    expect(j).toMatchObject({ width: 720, height: 486, bitDepth: 8, matrix: '601', range: 'studio' })
    // The PLUGE's −4 IRE step sits below setup (SMPTE EG 1 practice — memory): code 7 is kept.
    expect(j.luma.min).toBe(7)
    expect(j.verdict).toBe('fail')
    expect(j.reasons[0]).toMatchObject({ limit: 'luma-min' })
    expect(j.line.index).toBe(100)
    expect(j.line.samples).toHaveLength(720)
    expect(Object.keys(j.line.samples[0])).toEqual(['x', 'us', 'lumaIre', 'compMinIre', 'compMaxIre', 'chromaPpIre', 'phaseDeg', 'r', 'g', 'b'])
  })

  it('prints a readable summary, and fails with a message and a non-zero code on bad input', async () => {
    const png = writeWithFfmpeg(new Uint8Array(W * H * 3).fill(255), 'rgb24', 'white.png', [])
    const ok = await cli([png, '--spec', 'digital-studio', '--matrix', '709'])
    expect(ok.code).toBe(0)
    expect(ok.stdout).toMatch(/verdict\s+PASS against digital-studio/)
    expect(ok.stdout).toMatch(/BT\.709/)
    const junk = join(dir, 'junk2.png')
    writeFileSync(junk, 'garbage')
    const bad = await cli([junk])
    expect(bad.code).toBe(1)
    expect(bad.stderr).toMatch(/^analyse: not a readable picture/)
    const usage = await cli([png, '--spec', 'nope'])
    expect(usage.code).toBe(2)
    expect(usage.stderr).toMatch(/unknown spec "nope"/)
  })
})
