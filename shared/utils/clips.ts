// Clips: uploaded video files whose every frame is measured. Limits, statuses, the routes'
// bodies and the queue jobs, shared by the server, the worker and the browser.
import { z } from 'zod'

/** Caps for one clip. Clips have their own, far larger size cap than stills. */
export const CLIP_LIMITS = {
  maxBytes: 200 * 2 ** 30,
  /** Clips always go to S3 in parts of this size (a 200 GiB clip is 3 200 parts, within S3's 10 000). */
  partSize: 64 * 2 ** 20,
  /** Largest picture measured (8K UHD with room), checked on the probe before decoding. */
  maxPixels: 40_000_000,
  /** Longest clip measured: 24 hours at 60 fps. */
  maxFrames: 24 * 3600 * 60,
}

/** Names that look like a clip (first guess in the browser; the server probes the bytes). */
export const CLIP_EXTENSIONS = ['mov', 'mp4', 'm4v', 'mxf', 'mkv', 'webm', 'avi', 'mts', 'm2ts', 'ts', 'nut'] as const
export function isClipName(name: string): boolean {
  const ext = name.toLowerCase().split('.').pop() ?? ''
  return (CLIP_EXTENSIONS as readonly string[]).includes(ext)
}

export const CLIP_STATUSES = ['uploading', 'queued', 'probing', 'measuring', 'merging', 'done', 'failed', 'cancelled'] as const
export type ClipStatus = (typeof CLIP_STATUSES)[number]
/** States in which the clip's work is still to finish (cancel applies). */
export const CLIP_ACTIVE: readonly ClipStatus[] = ['queued', 'probing', 'measuring', 'merging']

export const ClipPresignBody = z.object({
  name: z.string().min(1).max(1000),
  size: z.number().int().positive('The file is empty').max(CLIP_LIMITS.maxBytes, `The clip is larger than ${CLIP_LIMITS.maxBytes / 2 ** 30} GiB`),
})

export const ClipCompleteBody = z.object({
  parts: z.array(z.object({ partNumber: z.number().int().min(1).max(10000), etag: z.string().min(1).max(200) })).min(1).max(10000),
})

/** Frame numbers are 0-based from the clip's first frame. */
export const ClipFrameBody = z.object({ frame: z.number().int().min(0).max(CLIP_LIMITS.maxFrames) })

export const QUEUE_CLIP = 'clip'
export const QUEUE_CLIP_CHUNK = 'clip-chunk'

/** The first job of a clip: probe it and lay out its chunks (a flow: merge parent, chunk children). */
export interface ClipProbeJob { kind: 'probe', clipId: number }
/** The flow's parent: runs once every chunk is measured. */
export interface ClipMergeJob { kind: 'merge', clipId: number }
/** Extract one frame of a clip as a frame of the reel (asked for from the timeline). */
export interface ClipExtractJob { kind: 'extract', clipId: number, frame: number }
export type ClipJob = ClipProbeJob | ClipMergeJob | ClipExtractJob
export interface ClipChunkJob { clipId: number, index: number, start: number, count: number }

export const clipProbeJobId = (clipId: number) => `clip-${clipId}-probe`
export const clipMergeJobId = (clipId: number, run: number) => `clip-${clipId}-merge-${run}`
export const clipChunkJobId = (clipId: number, run: number, index: number) => `clip-${clipId}-${run}-chunk-${index}`
export const clipExtractJobId = (clipId: number, frame: number) => `clip-${clipId}-extract-${frame}`

/** A chunk of this many seconds is one child job: long enough to amortise ffmpeg's start, short enough to spread. */
export const CHUNK_SECONDS = 20

/** Frames kept for the filmstrip: one every this many seconds. */
export const FILMSTRIP_SECONDS = 10

/**
 * Frames [start, start+count) of a clip in chunks of about `chunkFrames`. Every chunk
 * starts on a frame boundary; the last takes the rest.
 */
export function planChunks(frameCount: number, chunkFrames: number): { index: number, start: number, count: number }[] {
  const size = Math.max(1, Math.floor(chunkFrames))
  const out = []
  for (let start = 0, index = 0; start < frameCount; start += size, index++) {
    out.push({ index, start, count: Math.min(size, frameCount - start) })
  }
  return out
}
