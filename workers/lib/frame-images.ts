// The images the analyse job writes for a frame: thumbnail, range overlay and the scopes.
// Kept apart from the job so the step benchmark (tests/bench/pipeline-steps.ts) times this
// very code, step by step, rather than a copy of it.
import sharp from 'sharp'
import { paintRangeMask, PALETTE, renderRangeOverlay, renderVectorscope, renderWaveform } from '../../shared/engine/index'
import type { DeliverySpec, FrameAnalysis, FrameInput, MatrixName, OverlayMask, RgbaImage, RgbImage } from '../../shared/engine/index'
import { overlayGeometry } from '../../shared/engine/render'

/** Images written per frame; the API serves them as /api/frames/:id/images/:kind. */
export const IMAGE_KINDS = ['thumb', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] as const
export type ImageKind = (typeof IMAGE_KINDS)[number]

export const THUMB_WIDTH = 320
export const OVERLAY_WIDTH = 1280

/**
 * zlib levels, measured on the noisy 1080p benchmark frames (CPU, one libvips thread). The
 * overlay is a picture, and camera noise leaves zlib little to find: level 1 took about 4×
 * the CPU of storing it (level 0: 3–7 ms against 29 ms at 1280×720) for a file only a sixth
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

function rawRgb(img: RgbImage | { width: number, height: number, data: Uint8Array }) {
  return sharp(Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength), { raw: { width: img.width, height: img.height, channels: 3 } })
}

const frameImage = (out: Buffer, contentType: FrameImage['contentType']): FrameImage =>
  ({ data: new Uint8Array(out.buffer, out.byteOffset, out.length), contentType })

/** Our renderers draw opaque images: the alpha channel would be a quarter of what zlib reads, for nothing. */
async function png(img: RgbaImage, compressionLevel: number): Promise<FrameImage> {
  return frameImage(await rawRgba(img).removeAlpha().png({ compressionLevel, adaptiveFiltering: false }).toBuffer(), 'image/png')
}

/**
 * The overlay's marks as the analysis pass gathered them, on the verdict's own level bins,
 * where the engine provides them (`rangeMask`) for exactly the blocks of the overlay drawn
 * here: the overlay then reads the frame for the picture only. Otherwise it tests the pixels.
 */
export function overlayMask(analysis: FrameAnalysis): OverlayMask | undefined {
  const mask = analysis.rangeMask
  const size = overlayGeometry(analysis.width, analysis.height, OVERLAY_WIDTH)
  return mask && mask.width === size.width && mask.height === size.height ? mask : undefined
}

/**
 * The overlay (3 bytes a pixel) and the unmarked picture it is painted on, at the overlay's
 * size. Full-range 8-bit R'G'B' codes are the display levels themselves, so with the engine's
 * mask libvips scales the decoded frame (about 7 ms for 1080p) and the marks are painted on
 * that; every other input goes through the engine's row decoding (renderRangeOverlay, about
 * 40 ms with a mask and 50 without for 1080p).
 */
async function overlayImages(input: FrameInput, analysis: FrameAnalysis, spec: DeliverySpec, matrix: MatrixName, step: Step) {
  const mask = overlayMask(analysis)
  if (mask && input.kind === 'rgb' && input.bitDepth === 8 && input.range === 'full') {
    const data = input.data as Uint8Array
    const picture = await step('overlay picture (libvips)', async () => {
      let s = sharp(Buffer.from(data.buffer, data.byteOffset, data.byteLength), { raw: { width: input.width, height: input.height, channels: input.channels } })
      if (input.channels === 4) s = s.removeAlpha()
      const out = await s.resize({ width: mask.width, height: mask.height, fit: 'fill' }).raw().toBuffer()
      return { width: mask.width, height: mask.height, data: new Uint8Array(out.buffer, out.byteOffset, out.length) }
    })
    const overlay = await step('overlay paint', () => ({ ...picture, data: paintRangeMask(picture.data, mask, PALETTE.overlayHigh, PALETTE.overlayLow) }))
    return { picture, overlay: await step('overlay png', async () => frameImage(await rawRgb(overlay).png({ compressionLevel: PNG_LEVEL.overlay, adaptiveFiltering: false }).toBuffer(), 'image/png')) }
  }
  const drawn = await step('overlay render', () => renderRangeOverlay(input, spec, { matrix, maxWidth: OVERLAY_WIDTH, withPicture: true, mask }))
  return { picture: drawn.picture!, overlay: await step('overlay png', () => png(drawn, PNG_LEVEL.overlay)) }
}

export async function renderFrameImages(
  input: FrameInput, analysis: FrameAnalysis, spec: DeliverySpec, matrix: MatrixName, step: Step = run,
): Promise<Record<ImageKind, FrameImage>> {
  const w = analysis.waveform
  const v = analysis.vectorscope
  if (!w || !v) throw new Error('the analysis was made without keepDensities: no scope data to draw')
  // Drawn straight at the width it is stored at; the unmarked picture under it is all the
  // thumbnail needs, whatever the input kind (8 or 16 bits, raw Y'CbCr).
  const { picture, overlay } = await overlayImages(input, analysis, spec, matrix, step)
  const thumb = await step('thumb (resize+jpeg)', async () =>
    frameImage(await rawRgb(picture).resize({ width: THUMB_WIDTH, withoutEnlargement: true }).jpeg({ quality: 80 }).toBuffer(), 'image/jpeg'))
  const scopes = {
    'waveform-luma': () => renderWaveform(w, 'luma'),
    'waveform-flat': () => renderWaveform(w, 'flat'),
    'waveform-rgb': () => renderWaveform(w, 'rgb'),
    'vectorscope': () => renderVectorscope(v, { matrix }),
  } as const
  const images: Partial<Record<ImageKind, FrameImage>> = { thumb, overlay }
  for (const [kind, render] of Object.entries(scopes) as Array<[keyof typeof scopes, () => RgbaImage]>) {
    const img = await step(`${kind} render`, render)
    images[kind] = await step(`${kind} png`, () => png(img, PNG_LEVEL.scope))
  }
  return images as Record<ImageKind, FrameImage>
}
