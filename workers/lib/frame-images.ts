// The images the analyse job writes for a frame: thumbnail, range overlay and the scopes.
// Kept apart from the job so the step benchmark (tests/bench/pipeline-steps.ts) times this
// very code, step by step, rather than a copy of it.
import sharp from 'sharp'
import { renderRangeOverlay, renderVectorscope, renderWaveform } from '../../shared/engine/index'
import type { DeliverySpec, FrameAnalysis, FrameInput, MatrixName, RgbaImage } from '../../shared/engine/index'

/** Images written per frame; the API serves them as /api/frames/:id/images/:kind. */
export const IMAGE_KINDS = ['thumb', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] as const
export type ImageKind = (typeof IMAGE_KINDS)[number]

export const THUMB_WIDTH = 320
export const OVERLAY_WIDTH = 1280

/**
 * zlib levels, measured on the noisy 1080p benchmark frames (CPU, one libvips thread). The
 * overlay is a picture, and camera noise leaves zlib little to find: level 1 took about 4×
 * the CPU of storing it (level 0: 7 ms against 29 ms at 1280×720) for a file only a sixth
 * smaller (2.3 MB against 2.8 MB). The scope images are small: level 1 takes about 70 % of
 * level 2's CPU for files about a third larger. Row filters (adaptiveFiltering) take a
 * quarter off the overlay for 1.6× level 1's CPU and make the scope images larger; a
 * palette (libimagequant) costs 3–4× the CPU of level 2.
 */
export const PNG_LEVEL = { overlay: 0, scope: 1 } as const

export interface FrameImage {
  data: Uint8Array
  contentType: 'image/png' | 'image/jpeg'
}

/** Runs one named step; the benchmark passes one that times it. */
export type Step = <T>(name: string, f: () => T | Promise<T>) => Promise<T>
const run: Step = async (_name, f) => f()

/**
 * One libvips thread per pipeline: the worker already runs one analysis thread per core, so
 * more would only contend for the same cores. No operation cache either: every frame is new,
 * and the cache would only hold on to memory (up to 50 MB by default).
 */
export function configureSharp(): void {
  sharp.concurrency(1)
  sharp.cache(false)
}

function rawRgba(img: RgbaImage) {
  return sharp(Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength), { raw: { width: img.width, height: img.height, channels: 4 } })
}

/** Our renderers draw opaque images: the alpha channel would be a quarter of what zlib reads, for nothing. */
async function png(img: RgbaImage, compressionLevel: number): Promise<FrameImage> {
  const out = await rawRgba(img).removeAlpha().png({ compressionLevel, adaptiveFiltering: false }).toBuffer()
  return { data: new Uint8Array(out.buffer, out.byteOffset, out.length), contentType: 'image/png' }
}

export async function renderFrameImages(
  input: FrameInput, analysis: FrameAnalysis, spec: DeliverySpec, matrix: MatrixName, step: Step = run,
): Promise<Record<ImageKind, FrameImage>> {
  const w = analysis.waveform
  const v = analysis.vectorscope
  if (!w || !v) throw new Error('the analysis was made without keepDensities: no scope data to draw')
  // Drawn straight at the width it is stored at; the same pass gives the unmarked picture,
  // which is all the thumbnail needs, whatever the input kind (8 or 16 bits, raw Y'CbCr).
  const overlay = await step('overlay render', () => renderRangeOverlay(input, spec, { matrix, maxWidth: OVERLAY_WIDTH, withPicture: true }))
  const thumb = await step('thumb (resize+jpeg)', async () => {
    const pic = overlay.picture!
    const out = await sharp(Buffer.from(pic.data.buffer, pic.data.byteOffset, pic.data.byteLength), { raw: { width: pic.width, height: pic.height, channels: 3 } })
      .resize({ width: THUMB_WIDTH, withoutEnlargement: true }).jpeg({ quality: 80 }).toBuffer()
    return { data: new Uint8Array(out.buffer, out.byteOffset, out.length), contentType: 'image/jpeg' } satisfies FrameImage
  })
  const overlayPng = await step('overlay png', () => png(overlay, PNG_LEVEL.overlay))
  const scopes = {
    'waveform-luma': () => renderWaveform(w, 'luma'),
    'waveform-flat': () => renderWaveform(w, 'flat'),
    'waveform-rgb': () => renderWaveform(w, 'rgb'),
    'vectorscope': () => renderVectorscope(v, { matrix }),
  } as const
  const images: Partial<Record<ImageKind, FrameImage>> = { thumb, overlay: overlayPng }
  for (const [kind, render] of Object.entries(scopes) as Array<[keyof typeof scopes, () => RgbaImage]>) {
    const img = await step(`${kind} render`, render)
    images[kind] = await step(`${kind} png`, () => png(img, PNG_LEVEL.scope))
  }
  return images as Record<ImageKind, FrameImage>
}
