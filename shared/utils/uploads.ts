import { z } from 'zod'
import { cleanName } from './text'
import { nameField } from './validation'

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

const ReelFields = {
  name: nameField(160, 'Enter a reel name'),
  sourceLabel: z.string().transform(cleanName).pipe(z.string().max(120, 'Use at most 120 characters')),
  sourceRange: z.enum(['full', 'studio']),
  matrix: z.enum(['601', '709']),
}
export const ReelBody = z.object({
  ...ReelFields,
  sourceLabel: ReelFields.sourceLabel.default(''),
  sourceRange: ReelFields.sourceRange.default('full'),
  matrix: ReelFields.matrix.default('601'),
})
/** Built from the fields without their defaults: a partial update changes only what was sent. */
export const ReelPatchBody = z.object(ReelFields).partial().refine((v) => Object.keys(v).length > 0, 'Send at least one field to change')

export const FRAME_STATUSES = ['queued', 'analysing', 'done', 'failed'] as const
export type FrameStatus = (typeof FRAME_STATUSES)[number]
