import { z } from 'zod'
import { cleanName } from './text'
import { nameField } from './validation'
import { FRAME_RATES, FRAME_RATE_NAMES, canDropFrame, type FrameRateName } from './timecode'

export const FRAME_FORMATS = ['png', 'jpeg', 'tiff', 'webp', 'uyvy', 'v210'] as const
export type FrameFormat = (typeof FRAME_FORMATS)[number]
export const RAW_FORMATS = ['uyvy', 'v210'] as const

/** Caps for one uploaded file (the browser checks them first; the server decides). */
export const UPLOAD_LIMITS = {
  maxBytes: 256 * 2 ** 20,
  /** 40 MP holds 8K UHD (33.2 MP) with room; larger is refused before decoding. */
  maxPixels: 40_000_000,
  maxFilesPerRequest: 200,
  /** Files above this go to S3 in parts. */
  multipartThreshold: 32 * 2 ** 20,
  partSize: 16 * 2 ** 20,
}

/** The format a file claims from its name: only a first guess, the server sniffs the bytes. */
export function formatFromName(name: string): FrameFormat | null {
  const ext = name.toLowerCase().split('.').pop() ?? ''
  return ({ png: 'png', jpg: 'jpeg', jpeg: 'jpeg', tif: 'tiff', tiff: 'tiff', webp: 'webp', uyvy: 'uyvy', yuv: 'uyvy', v210: 'v210' } as const)[ext as 'png'] ?? null
}

export const DeclaredFile = z.object({
  name: z.string().min(1).max(1000),
  size: z.number().int().positive('The file is empty').max(UPLOAD_LIMITS.maxBytes, `The file is larger than ${UPLOAD_LIMITS.maxBytes / 2 ** 20} MiB`),
  format: z.enum(FRAME_FORMATS, { message: 'Unsupported type: send PNG, TIFF, JPEG or WebP stills, or raw UYVY or v210' }),
  rawWidth: z.number().int().min(2).max(16384).optional(),
  rawHeight: z.number().int().min(1).max(16384).optional(),
})
export const PresignBody = z.object({ files: z.array(DeclaredFile).min(1).max(UPLOAD_LIMITS.maxFilesPerRequest) })
export const CompleteUploadBody = z.object({
  parts: z.array(z.object({ partNumber: z.number().int().min(1).max(10000), etag: z.string().min(1).max(200) })).max(10000).optional(),
})

/** A reel's settings as sent: no defaults here, so a partial body names only what it changes. */
const ReelFields = z.object({
  name: nameField(160, 'Enter a reel name'),
  sourceLabel: z.string().transform(cleanName).pipe(z.string().max(120, 'Use at most 120 characters')),
  sourceRange: z.enum(['full', 'studio']),
  matrix: z.enum(['601', '709']),
  frameRate: z.enum(FRAME_RATE_NAMES as [FrameRateName, ...FrameRateName[]]).nullable(),
  dropFrame: z.boolean(),
})

/** Drop-frame labels exist only at 29.97 and 59.94 (SMPTE ST 12-1). */
export function dropFrameProblem(frameRate: FrameRateName | null | undefined, dropFrame: boolean | undefined): string | null {
  if (!dropFrame) return null
  if (!frameRate || !canDropFrame(FRAME_RATES[frameRate])) return 'Drop-frame timecode exists only at 29.97 and 59.94 frames per second'
  return null
}

export const ReelBody = ReelFields.extend({
  sourceLabel: ReelFields.shape.sourceLabel.default(''),
  sourceRange: ReelFields.shape.sourceRange.default('full'),
  matrix: ReelFields.shape.matrix.default('601'),
  frameRate: ReelFields.shape.frameRate.default(null),
  dropFrame: ReelFields.shape.dropFrame.default(false),
}).refine((b) => !dropFrameProblem(b.frameRate, b.dropFrame), { message: dropFrameProblem('24', true)!, path: ['dropFrame'] })
/** Only the fields sent change (ReelFields has no defaults to fill in the others). */
export const ReelPatchBody = ReelFields.partial().refine((v) => Object.keys(v).length > 0, 'Send at least one field to change')

/** Settings that change what the engine measures: changing either re-measures the reel. */
export const MEASURE_SETTINGS = ['matrix', 'sourceRange'] as const

/**
 * The matrix a picture of this size is usually coded with: standard-definition sizes
 * (up to 576 lines) BT.601, HD and up (720 lines or more) BT.709 — common practice.
 * Null between the two, where no habit holds.
 */
export function usualMatrix(width: number, height: number): '601' | '709' | null {
  if (height <= 576 && width <= 1024) return '601'
  if (height >= 720 || width >= 1280) return '709'
  return null
}

export const FRAME_STATUSES = ['queued', 'analysing', 'done', 'failed'] as const
export type FrameStatus = (typeof FRAME_STATUSES)[number]
