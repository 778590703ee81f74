// What an upload must be before it becomes a frame. Plain functions shared by the presigned
// flow, the multipart API and their tests: the same file is refused for the same reason
// whichever way it came in.
import { createHash } from 'node:crypto'
import sharp from 'sharp'
import { v210Stride } from '../../shared/engine/decode'
import { UPLOAD_LIMITS, type FrameFormat } from '../../shared/utils/uploads'
import { stripInvisible } from '../../shared/utils/text'
import { parseTimecode, type ParsedTimecode } from '../../shared/utils/timecode'

/** A refused upload: `status` for HTTP, `reason` for the person who sent it. */
export class IntakeError extends Error {
  constructor(public status: number, public reason: string) {
    super(reason)
    this.name = 'IntakeError'
  }
}

/** Refuses names that try to steer a path or hide characters; the name is only ever a label. */
export function checkFileName(sent: string): string {
  // Bidi overrides and zero-width characters would make the name read differently on screen and in the sheet.
  const name = stripInvisible(sent)
  if (name.length === 0) throw new IntakeError(400, 'The file has no name')
  if (name.includes('\0')) throw new IntakeError(400, 'The file name contains a NUL character')
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(name)) throw new IntakeError(400, 'The file name contains control characters')
  if (/[/\\]/.test(name) || name === '.' || name === '..') throw new IntakeError(400, `The file name "${name.slice(0, 80)}" contains a path; send the file name only`)
  if ([...name].length > 200) throw new IntakeError(400, 'The file name is longer than 200 characters')
  return name.normalize('NFC')
}

const MAGIC: [FrameFormat, (b: Uint8Array) => boolean][] = [
  ['png', (b) => b[0] === 0x89 && b[1] === 0x50 && b[2] === 0x4e && b[3] === 0x47 && b[4] === 0x0d && b[5] === 0x0a && b[6] === 0x1a && b[7] === 0x0a],
  ['jpeg', (b) => b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff],
  ['tiff', (b) => (b[0] === 0x49 && b[1] === 0x49 && b[2] === 0x2a && b[3] === 0x00) || (b[0] === 0x4d && b[1] === 0x4d && b[2] === 0x00 && b[3] === 0x2a)],
  ['webp', (b) => b[0] === 0x52 && b[1] === 0x49 && b[2] === 0x46 && b[3] === 0x46 && b[8] === 0x57 && b[9] === 0x45 && b[10] === 0x42 && b[11] === 0x50],
]

/** Names what a refused file looks like, so the reason says more than "unsupported". */
function describeOther(b: Uint8Array): string {
  const text = new TextDecoder('utf-8', { fatal: false }).decode(b.subarray(0, 512)).trimStart().toLowerCase()
  if (b[0] === 0x50 && b[1] === 0x4b && (b[2] === 0x03 || b[2] === 0x05)) return 'a ZIP archive'
  if (b[0] === 0x1f && b[1] === 0x8b) return 'a gzip archive'
  if (text.startsWith('%pdf')) return 'a PDF document'
  if (text.includes('<svg')) return 'an SVG drawing'
  if (text.startsWith('<!doctype html') || text.startsWith('<html') || text.includes('<script')) return 'an HTML document'
  if (b[0] === 0x47 && b[1] === 0x49 && b[2] === 0x46) return 'a GIF picture'
  if (text.length && /^[\t\n\r\x20-\x7e]*$/.test(text.slice(0, 256))) return 'a text file'
  return 'not a PNG, TIFF, JPEG or WebP picture'
}

export function sniffFormat(head: Uint8Array): FrameFormat | null {
  return MAGIC.find(([, test]) => test(head))?.[0] ?? null
}

export interface Inspected {
  format: FrameFormat
  width: number
  height: number
  /** A timecode written in the file's metadata (PNG text chunk, XMP), if any. */
  timecode?: ParsedTimecode | null
}

/** PNG text keywords taken as a timecode (tEXt/zTXt/iTXt, as sharp lists them). */
const TIMECODE_KEYWORDS = /^(time[ _-]?code|tc|start[ _-]?time[ _-]?code)$/i
/** XMP Dynamic Media timecode: `xmpDM:timeValue` (Adobe XMP Specification Part 2, xmpDM Timecode type). */
const XMP_TIME_VALUE = /xmpDM:timeValue(?:="|>)\s*([0-9:;.]{11})/

/** The timecode a file carries in its metadata: a PNG text chunk first, then XMP (PNG, TIFF, JPEG, WebP). */
export function embeddedTimecode(meta: { comments?: { keyword: string; text: string }[]; xmpAsString?: string }): ParsedTimecode | null {
  for (const c of meta.comments ?? []) {
    if (TIMECODE_KEYWORDS.test(c.keyword.trim())) {
      const tc = parseTimecode(c.text)
      if (tc) return tc
    }
  }
  const xmp = meta.xmpAsString && XMP_TIME_VALUE.exec(meta.xmpAsString)
  return xmp ? parseTimecode(xmp[1]!) : null
}

/** describeOther reads this many leading bytes; no check looks further without decoding. */
const HEAD_BYTES = 512

/**
 * The checks that need only the size and the first bytes: size, type from the bytes (never
 * from the name), raw size against the declared width and height. Throws the refusal.
 */
function checkSizeAndType(length: number, head: Uint8Array, declared: { format: FrameFormat; rawWidth?: number | null; rawHeight?: number | null }): Inspected | FrameFormat {
  if (length === 0) throw new IntakeError(422, 'The file is empty')
  if (length > UPLOAD_LIMITS.maxBytes) throw new IntakeError(413, `The file is larger than ${UPLOAD_LIMITS.maxBytes / 2 ** 20} MiB`)
  if (declared.format === 'uyvy' || declared.format === 'v210') {
    const w = declared.rawWidth ?? 0
    const h = declared.rawHeight ?? 0
    if (!w || !h) throw new IntakeError(422, 'Raw Y\'CbCr needs its width and height')
    if (w * h > UPLOAD_LIMITS.maxPixels) throw new IntakeError(422, `${w}×${h} is more than the ${UPLOAD_LIMITS.maxPixels / 1e6} megapixel limit`)
    const expected = rawBytes(declared.format, w, h)
    if (length !== expected) {
      throw new IntakeError(422, `Raw ${declared.format} at ${w}×${h} should be ${expected} bytes; this file has ${length}. Check the width, height and format.`)
    }
    const found = sniffFormat(head)
    if (found) throw new IntakeError(422, `This is a ${found.toUpperCase()} picture, not raw ${declared.format}`)
    return { format: declared.format, width: w, height: h }
  }
  const format = sniffFormat(head)
  if (!format) throw new IntakeError(415, `Unsupported file: this is ${describeOther(head)}. Linewise reads PNG, TIFF, JPEG and WebP stills, and raw UYVY or v210.`)
  return format
}

const rawBytes = (format: 'uyvy' | 'v210', w: number, h: number) => (format === 'uyvy' ? w * h * 2 : v210Stride(w) * h)

/**
 * Checks a stored object: size, type from its bytes (never from its name), and dimensions
 * from its header, before anything decodes its pixels.
 */
export async function inspectUpload(bytes: Uint8Array, declared: { format: FrameFormat; rawWidth?: number | null; rawHeight?: number | null }): Promise<Inspected> {
  const checked = checkSizeAndType(bytes.length, bytes, declared)
  if (typeof checked === 'object') return checked
  const format = checked
  let meta: Awaited<ReturnType<ReturnType<typeof sharp>['metadata']>>
  try {
    // Header only: limitInputPixels refuses a decompression bomb before any pixel is decoded.
    meta = await sharp(bytes, { limitInputPixels: false }).metadata()
  } catch (e) {
    throw new IntakeError(422, `The ${format.toUpperCase()} file cannot be read: ${(e as Error).message.replace(/^Input buffer /, '')}`)
  }
  if (!meta.width || !meta.height) throw new IntakeError(422, `The ${format.toUpperCase()} file has no picture size`)
  if (meta.width * meta.height > UPLOAD_LIMITS.maxPixels) {
    throw new IntakeError(422, `The picture is ${meta.width}×${meta.height}, more than the ${UPLOAD_LIMITS.maxPixels / 1e6} megapixel limit`)
  }
  return { format, width: meta.width, height: meta.height, timecode: embeddedTimecode(meta) }
}

export interface Received {
  name: string
  bytes: Uint8Array
  sha256: string
  inspected: Inspected
}

/**
 * Takes one file as it arrives (a part of a multipart body): counts, hashes and keeps its
 * bytes, and stops keeping and hashing them as soon as the size or the first bytes show it
 * will be refused, so a huge or wrong file costs no memory; its bytes are still read to the
 * end, so the rest of the body goes on. The answer comes from the same checks as
 * inspectUpload in the same order, so it is the one the whole file would have got.
 */
export async function receiveFile(stream: AsyncIterable<Uint8Array>, declared: { name: string; format: FrameFormat; rawWidth?: number | null; rawHeight?: number | null }): Promise<Received> {
  let name: string
  try {
    name = checkFileName(declared.name)
  } catch (e) {
    await drain(stream)
    throw e
  }
  const raw = declared.format === 'uyvy' || declared.format === 'v210'
  const w = declared.rawWidth ?? 0
  const h = declared.rawHeight ?? 0
  // Beyond this size the file is refused whatever its bytes are.
  const cap = raw && w && h && w * h <= UPLOAD_LIMITS.maxPixels ? Math.min(rawBytes(declared.format as 'uyvy' | 'v210', w, h), UPLOAD_LIMITS.maxBytes) : UPLOAD_LIMITS.maxBytes
  const hash = createHash('sha256')
  const chunks: Uint8Array[] = []
  const head = new Uint8Array(HEAD_BYTES)
  let headLength = 0
  let length = 0
  let keeping = !(raw && (!w || !h || w * h > UPLOAD_LIMITS.maxPixels))
  let typeRefused: boolean | null = null
  try {
    for await (const chunk of stream) {
      length += chunk.length
      if (headLength < HEAD_BYTES) {
        const take = chunk.subarray(0, HEAD_BYTES - headLength)
        head.set(take, headLength)
        headLength += take.length
      }
      if (!keeping) continue
      // The magic numbers are in the first 12 bytes: from then on the type is known. A still
      // must be a picture; raw data must not be one.
      if (typeRefused === null && headLength >= 12) typeRefused = raw ? sniffFormat(head) !== null : sniffFormat(head) === null
      if (length > cap || typeRefused) {
        keeping = false
        chunks.length = 0
        continue
      }
      hash.update(chunk)
      chunks.push(chunk)
    }
  } catch {
    throw new IntakeError(400, 'The request ended before this file was complete; send it again')
  }
  if (!keeping) {
    checkSizeAndType(length, head.subarray(0, headLength), declared)
    throw new Error(`receiveFile stopped keeping "${name}" but the checks pass`)
  }
  const bytes = Buffer.concat(chunks, length)
  return { name, bytes, sha256: hash.digest('hex'), inspected: await inspectUpload(bytes, declared) }
}

async function drain(stream: AsyncIterable<Uint8Array>) {
  try {
    for await (const _ of stream) { /* read to its end so the body goes on */ }
  } catch { /* the refusal already has its reason */ }
}
