// Upload planning in the browser. Limits from shared/utils/uploads.ts (UPLOAD_LIMITS: 256 MiB a
// file, 200 files per announcement, 16 MiB parts); raw sizes people capture at (common practice)
// (UYVY 2 bytes a pixel; v210 packs 6 pixels in 16 bytes, rows padded to 48-pixel blocks of
// 128 bytes — the layout shared/engine/decode.ts reads).
import { describe, expect, it } from 'vitest'
import { UPLOAD_LIMITS } from '../../../shared/utils/uploads'
import {
  checkRawFile, checkRawSize, checkUploadFile, completeOutcome, inBatches, partRanges, rawFrameBytes, tallyUploads,
} from '../../../app/utils/upload-plan'

const MiB = 2 ** 20

describe('checking a file before it is sent', () => {
  it('accepts the still and raw types by their extension, in any case', () => {
    expect(checkUploadFile({ name: 'B012_C003.PNG', size: 10 })).toEqual({ ok: true, format: 'png', raw: false })
    expect(checkUploadFile({ name: 'grab.jpg', size: 10 })).toEqual({ ok: true, format: 'jpeg', raw: false })
    expect(checkUploadFile({ name: 'grab.tif', size: 10 })).toEqual({ ok: true, format: 'tiff', raw: false })
    expect(checkUploadFile({ name: 'cap.yuv', size: 10 })).toEqual({ ok: true, format: 'uyvy', raw: true })
    expect(checkUploadFile({ name: 'cap.v210', size: 10 })).toEqual({ ok: true, format: 'v210', raw: true })
  })

  it('refuses other types and says what would be read', () => {
    const r = checkUploadFile({ name: 'notes.pdf', size: 10 })
    expect(r).toEqual({ ok: false, reason: '“.pdf” files are not read: send PNG, TIFF, JPEG or WebP stills, or raw .uyvy, .yuv or .v210' })
    expect(checkUploadFile({ name: 'README', size: 10 })).toMatchObject({ ok: false, reason: expect.stringMatching(/^A file without an extension/) })
    // Folder drops carry the desktop's own files; they are listed as refused, not dropped.
    expect(checkUploadFile({ name: '.DS_Store', size: 6148 })).toMatchObject({ ok: false })
  })

  it('refuses empty files and files over 256 MiB, and accepts exactly 256 MiB', () => {
    expect(checkUploadFile({ name: 'a.png', size: 0 })).toEqual({ ok: false, reason: 'The file is empty' })
    expect(checkUploadFile({ name: 'a.png', size: UPLOAD_LIMITS.maxBytes + 1 })).toEqual({ ok: false, reason: 'The file is 256.0 MiB; the limit is 256 MiB' })
    expect(checkUploadFile({ name: 'a.tif', size: 300 * MiB })).toEqual({ ok: false, reason: 'The file is 300.0 MiB; the limit is 256 MiB' })
    expect(checkUploadFile({ name: 'a.png', size: UPLOAD_LIMITS.maxBytes }).ok).toBe(true)
  })
})

describe('raw Y\'CbCr sizes', () => {
  it('UYVY is 2 bytes a pixel: 720 × 486 is 699,840 bytes', () => {
    expect(rawFrameBytes('uyvy', 720, 486)).toBe(699_840)
    expect(rawFrameBytes('uyvy', 1920, 1080)).toBe(4_147_200)
  })

  it('v210 rows are whole 48-pixel blocks of 128 bytes: 720 → 15 blocks (1,920 bytes), 1920 → 40 blocks (5,120 bytes)', () => {
    expect(rawFrameBytes('v210', 720, 486)).toBe(1920 * 486)
    expect(rawFrameBytes('v210', 1920, 1080)).toBe(5120 * 1080)
    // 1280 = 26.67 blocks → 27 blocks = 3,456 bytes a row.
    expect(rawFrameBytes('v210', 1280, 720)).toBe(3456 * 720)
  })

  it('checks the size given for a batch', () => {
    expect(checkRawSize(720, 486)).toBeNull()
    expect(checkRawSize(721, 486)).toBe('Width must be even: 4:2:2 pixels come in pairs')
    expect(checkRawSize(0, 486)).toMatch(/^Width must be a whole number/)
    expect(checkRawSize(720, 0)).toMatch(/^Height must be a whole number/)
    expect(checkRawSize(720.5, 486)).toMatch(/^Width/)
    // 8192 × 8192 = 67.1 MP > 40 MP.
    expect(checkRawSize(8192, 8192)).toBe('8192 × 8192 is more than the 40 megapixel limit')
  })

  it('refuses a raw file whose length cannot be that size, naming the length it would need', () => {
    expect(checkRawFile('uyvy', 699_840, 720, 486)).toBeNull()
    expect(checkRawFile('uyvy', 691_200, 720, 486)).toBe('Raw uyvy at 720 × 486 is 699,840 bytes; this file has 691,200. Check the width, height and format.')
  })
})

describe('announcing and sending', () => {
  it('announces at most 200 files a call', () => {
    const files = Array.from({ length: 451 }, (_, i) => i)
    const batches = inBatches(files)
    expect(batches.map((b) => b.length)).toEqual([200, 200, 51])
    expect(batches.flat()).toEqual(files)
    expect(inBatches([])).toEqual([])
    expect(() => inBatches([1], 0)).toThrow(RangeError)
  })

  it('cuts a file into the presigned parts: 16 MiB each, the last one the rest', () => {
    const size = 40 * MiB + 5
    expect(partRanges(size, 16 * MiB, [1, 2, 3])).toEqual([
      { partNumber: 1, start: 0, end: 16 * MiB },
      { partNumber: 2, start: 16 * MiB, end: 32 * MiB },
      { partNumber: 3, start: 32 * MiB, end: 40 * MiB + 5 },
    ])
    // A file of exactly two parts has no empty third.
    expect(partRanges(32 * MiB, 16 * MiB, [2, 1]).map((p) => p.end - p.start)).toEqual([16 * MiB, 16 * MiB])
  })

  it('refuses a part list that does not cover the file', () => {
    expect(() => partRanges(40 * MiB, 16 * MiB, [1, 2])).toThrow('The server offered 2 parts for a file that needs 3')
    expect(() => partRanges(40 * MiB, 16 * MiB, [1, 2, 4])).toThrow(/needs 3/)
  })
})

describe('the answer to "complete"', () => {
  it('a new frame is queued; a known picture is a duplicate of the existing frame', () => {
    expect(completeOutcome({ status: 201, body: { ok: true, frameId: 41, duplicate: false, queued: true } })).toEqual({ state: 'queued', frameId: 41 })
    expect(completeOutcome({ status: 200, body: { ok: true, frameId: 12, duplicate: true, queued: true } })).toEqual({ state: 'duplicate', frameId: 12 })
  })

  it('a refusal after the server read the bytes is final and keeps its reason', () => {
    expect(completeOutcome({ status: 415, body: { ok: false, reason: 'Unsupported file: this is a PDF document.' } }))
      .toEqual({ state: 'refused', reason: 'Unsupported file: this is a PDF document.' })
  })

  it('missing bytes are sent again; an expired announcement is announced again; a lost answer asks again', () => {
    expect(completeOutcome({ status: 409, body: { statusMessage: 'The file has not arrived in storage; send it again' } }))
      .toEqual({ state: 'failed', reason: 'The file has not arrived in storage; send it again', retryFrom: 'send' })
    expect(completeOutcome({ status: 410, body: { statusMessage: 'This upload expired; add the file again' } }))
      .toMatchObject({ state: 'failed', retryFrom: 'announce' })
    expect(completeOutcome({ error: 'The server could not be reached' })).toEqual({ state: 'failed', reason: 'The server could not be reached', retryFrom: 'complete' })
    expect(completeOutcome({ status: 503, body: {} })).toEqual({ state: 'failed', reason: 'The server answered 503', retryFrom: 'complete' })
  })
})

describe('the batch line', () => {
  it('counts each state once and the bytes of files on their way', () => {
    const t = tallyUploads([
      { state: 'queued', size: 100, sent: 100 },
      { state: 'duplicate', size: 50, sent: 50 },
      { state: 'sending', size: 200, sent: 80 },
      { state: 'waiting', size: 300, sent: 0 },
      { state: 'refused', size: 999, sent: 0 },
      { state: 'refused', size: 40, sent: 40 },
      { state: 'needs-size', size: 700, sent: 0 },
      { state: 'failed', size: 10, sent: 3 },
    ])
    expect(t).toEqual({ files: 8, finished: 5, queued: 1, duplicate: 1, refused: 2, failed: 1, active: 2, needsSize: 1, bytesSent: 273, bytesTotal: 700 })
  })
})
