// Planning a browser upload: which files can go at all, how they are announced to the server
// (in batches it accepts), how a large file is cut into the parts the server presigned, and
// what each answer means for the file. The XMLHttpRequest side lives in useFrameUpload.
import { RAW_FORMATS, UPLOAD_LIMITS, formatFromName, type FrameFormat } from '../../shared/utils/uploads'
import { v210Stride } from '../../shared/engine/decode'

export type RawFormat = (typeof RAW_FORMATS)[number]

export const ACCEPTED_EXTENSIONS = ['.png', '.tif', '.tiff', '.jpg', '.jpeg', '.webp', '.uyvy', '.yuv', '.v210'] as const

/** Sizes people capture raw frames at. 486 and 480 are NTSC active lines (analogue NTSC incl. half-lines; DV/MPEG/ATSC: SMPTE 170M and common practice). */
export const RAW_PRESETS = [
  { width: 720, height: 486, label: '720 × 486', note: 'NTSC, analogue active lines' },
  { width: 720, height: 480, label: '720 × 480', note: 'NTSC, DV and MPEG' },
  { width: 720, height: 576, label: '720 × 576', note: '625-line SD' },
  { width: 1280, height: 720, label: '1280 × 720', note: 'HD 720' },
  { width: 1920, height: 1080, label: '1920 × 1080', note: 'HD 1080' },
  { width: 3840, height: 2160, label: '3840 × 2160', note: 'UHD' },
] as const

export const MiB = 2 ** 20

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`
  if (n < MiB) return `${(n / 1024).toFixed(1)} KiB`
  if (n < 2 ** 30) return `${(n / MiB).toFixed(1)} MiB`
  return `${(n / 2 ** 30).toFixed(2)} GiB`
}

export function isRawFormat(f: FrameFormat | null): f is RawFormat {
  return f !== null && (RAW_FORMATS as readonly string[]).includes(f)
}

export type FileCheck =
  | { ok: true; format: FrameFormat; raw: boolean }
  | { ok: false; reason: string }

/**
 * What the browser can tell before sending anything: the type the name claims and the size.
 * The server still sniffs the bytes; this only spares people a wait for an answer we know.
 */
export function checkUploadFile(file: { name: string; size: number }): FileCheck {
  const format = formatFromName(file.name)
  if (!format) {
    const dot = file.name.lastIndexOf('.')
    const ext = dot > 0 ? file.name.slice(dot) : ''
    return {
      ok: false,
      reason: `${ext ? `“${ext}” files are not read` : 'A file without an extension is not read'}: send PNG, TIFF, JPEG or WebP stills, or raw .uyvy, .yuv or .v210`,
    }
  }
  if ([...file.name].length > 200) return { ok: false, reason: 'The file name is longer than 200 characters; rename it' }
  if (file.size <= 0) return { ok: false, reason: 'The file is empty' }
  if (file.size > UPLOAD_LIMITS.maxBytes) {
    return { ok: false, reason: `The file is ${formatBytes(file.size)}; the limit is ${UPLOAD_LIMITS.maxBytes / MiB} MiB` }
  }
  return { ok: true, format, raw: isRawFormat(format) }
}

/** Bytes a raw frame of this size holds: UYVY 2 bytes a pixel, v210 whole 48-pixel blocks per row. */
export function rawFrameBytes(format: RawFormat, width: number, height: number): number {
  return format === 'uyvy' ? width * height * 2 : v210Stride(width) * height
}

/** A width and height for the raw files of a batch, or why they cannot be used. */
export function checkRawSize(width: number, height: number): string | null {
  if (!Number.isInteger(width) || width < 2 || width > 16384) return 'Width must be a whole number from 2 to 16384'
  if (!Number.isInteger(height) || height < 1 || height > 16384) return 'Height must be a whole number from 1 to 16384'
  if (width % 2) return 'Width must be even: 4:2:2 pixels come in pairs'
  if (width * height > UPLOAD_LIMITS.maxPixels) return `${width} × ${height} is more than the ${UPLOAD_LIMITS.maxPixels / 1e6} megapixel limit`
  return null
}

/** A raw file whose length does not match the size given cannot be that size; say what it would need. */
export function checkRawFile(format: RawFormat, size: number, width: number, height: number): string | null {
  const expected = rawFrameBytes(format, width, height)
  if (size === expected) return null
  return `Raw ${format} at ${width} × ${height} is ${expected.toLocaleString('en-GB')} bytes; this file has ${size.toLocaleString('en-GB')}. Check the width, height and format.`
}

/** Splits a list into runs the server accepts in one call (at most 200 files per announcement). */
export function inBatches<T>(items: readonly T[], size: number = UPLOAD_LIMITS.maxFilesPerRequest): T[][] {
  if (!(size >= 1)) throw new RangeError('batch size must be at least 1')
  const out: T[][] = []
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size))
  return out
}

export interface PartRange { partNumber: number; start: number; end: number }

/**
 * The byte range of each presigned part. Parts are numbered from 1 and all but the last are
 * `partSize` long; a list that does not cover the file exactly is refused rather than sent.
 */
export function partRanges(size: number, partSize: number, partNumbers: readonly number[]): PartRange[] {
  const count = Math.ceil(size / partSize)
  const sorted = [...partNumbers].sort((a, b) => a - b)
  if (sorted.length !== count || sorted.some((n, i) => n !== i + 1)) {
    throw new Error(`The server offered ${partNumbers.length} parts for a file that needs ${count}`)
  }
  return sorted.map((partNumber) => {
    const start = (partNumber - 1) * partSize
    return { partNumber, start, end: Math.min(size, start + partSize) }
  })
}

export type UploadState = 'needs-size' | 'waiting' | 'sending' | 'checking' | 'queued' | 'duplicate' | 'refused' | 'failed'

export const UPLOAD_STATE_LABELS: Record<UploadState, string> = {
  'needs-size': 'needs size',
  waiting: 'waiting',
  sending: 'sending',
  checking: 'checking',
  queued: 'stored',
  duplicate: 'duplicate',
  refused: 'refused',
  failed: 'failed',
}

/** Where a failed file starts again when retried. */
export type RetryFrom = 'announce' | 'send' | 'complete'

export type CompleteOutcome =
  | { state: 'queued'; frameId: number }
  | { state: 'duplicate'; frameId: number }
  | { state: 'refused'; reason: string }
  | { state: 'failed'; reason: string; retryFrom: RetryFrom }

/**
 * What the answer to `POST …/uploads/:id/complete` means for the file. A refusal is final
 * (the server looked at the bytes); anything else can be tried again from the right step.
 */
export function completeOutcome(answer: { status: number; body: unknown } | { error: string }): CompleteOutcome {
  if ('error' in answer) return { state: 'failed', reason: answer.error, retryFrom: 'complete' }
  const body = (answer.body ?? {}) as { ok?: boolean; frameId?: number; duplicate?: boolean; reason?: string; statusMessage?: string; message?: string }
  if (body.ok === true && typeof body.frameId === 'number') {
    return body.duplicate ? { state: 'duplicate', frameId: body.frameId } : { state: 'queued', frameId: body.frameId }
  }
  if (body.ok === false) return { state: 'refused', reason: body.reason || 'The server refused the file' }
  const said = body.statusMessage || body.message || ''
  // 409: the bytes never reached storage; 410: the presigned addresses ran out; 404: the announcement is gone.
  if (answer.status === 409) return { state: 'failed', reason: said || 'The file did not arrive in storage', retryFrom: 'send' }
  if (answer.status === 410 || answer.status === 404) return { state: 'failed', reason: said || 'This upload expired', retryFrom: 'announce' }
  if (answer.status >= 400 && answer.status < 500 && said) return { state: 'refused', reason: said }
  return { state: 'failed', reason: said || `The server answered ${answer.status || 'nothing'}`, retryFrom: 'complete' }
}

export interface UploadTally {
  files: number
  finished: number
  queued: number
  duplicate: number
  refused: number
  failed: number
  active: number
  needsSize: number
  bytesSent: number
  bytesTotal: number
}

/** Counts for the batch line; bytes count only files that are, or were, on their way to storage. */
export function tallyUploads(items: readonly { state: UploadState; size: number; sent: number }[]): UploadTally {
  const t: UploadTally = { files: items.length, finished: 0, queued: 0, duplicate: 0, refused: 0, failed: 0, active: 0, needsSize: 0, bytesSent: 0, bytesTotal: 0 }
  for (const i of items) {
    if (i.state === 'queued') t.queued++
    else if (i.state === 'duplicate') t.duplicate++
    else if (i.state === 'refused') t.refused++
    else if (i.state === 'failed') t.failed++
    else if (i.state === 'needs-size') t.needsSize++
    else t.active++
    if (i.state !== 'needs-size' && !(i.state === 'refused' && i.sent === 0)) {
      t.bytesTotal += i.size
      t.bytesSent += Math.min(i.size, i.sent)
    }
  }
  t.finished = t.queued + t.duplicate + t.refused + t.failed
  return t
}
