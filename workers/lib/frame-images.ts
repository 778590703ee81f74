// The images the analyse job writes for a frame: thumbnail, viewing copy, range overlay and the scopes.
// Kept apart from the job so the step benchmark (tests/bench/pipeline-steps.ts) times this
// very code, step by step, rather than a copy of it.
import sharp, { type Sharp } from 'sharp'
import { PALETTE, renderMaskLayer, renderPicture, renderVectorscope, renderWaveform } from '../../shared/engine/index'
import type { AnalysisScratch, FrameAnalysis, FrameInput, ImageBuffer, MatrixName, RgbaImage } from '../../shared/engine/index'
import { PICTURE_WIDTH, THUMB_WIDTH, type FrameImageKind } from '../../shared/utils/frame-images'

/**
 * zlib levels, measured on the noisy 1080p benchmark frames (CPU, one libvips thread). The
 * scope images are small: level 1 takes about 70 % of level 2's CPU for files about a third
 * larger. Row filters (adaptiveFiltering) make them larger; a palette (libimagequant) costs
 * 3–4× the CPU of level 2. The overlay layer is mostly transparent, so any level is cheap.
 */
export const PNG_LEVEL = { overlay: 6, scope: 1 } as const

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

const frameImage = (out: Buffer, contentType: FrameImage['contentType']): FrameImage =>
  ({ data: new Uint8Array(out.buffer, out.byteOffset, out.length), contentType })

/** Our renderers draw opaque images: the alpha channel would be a quarter of what zlib reads, for nothing. */
async function png(img: RgbaImage, compressionLevel: number): Promise<FrameImage> {
  return frameImage(await rawRgba(img).removeAlpha().png({ compressionLevel, adaptiveFiltering: false }).toBuffer(), 'image/png')
}

/**
 * The viewing copy and the thumbnail, both from one display R'G'B' picture at the viewing
 * copy's width: full-range 8-bit stills are display levels already, so libvips scales the
 * decoded frame; other inputs are first read into display R'G'B' by the engine's row
 * decoding, point-sampled at twice the viewing copy's width, then scaled.
 */
export async function renderViewingCopies(input: FrameInput, matrix: MatrixName, step: Step = run): Promise<{ thumb: FrameImage, picture: FrameImage }> {
  const display = await step('display picture', async () => {
    let s: Sharp
    if (input.kind === 'rgb' && input.bitDepth === 8 && input.range === 'full') {
      const data = input.data as Uint8Array
      s = sharp(Buffer.from(data.buffer, data.byteOffset, data.byteLength), { raw: { width: input.width, height: input.height, channels: input.channels } })
      if (input.channels === 4) s = s.removeAlpha()
    }
    else {
      s = rawRgba(renderPicture(input, matrix, PICTURE_WIDTH * 2)).removeAlpha()
    }
    return s.resize({ width: PICTURE_WIDTH, withoutEnlargement: true }).raw().toBuffer({ resolveWithObject: true })
  })
  const raw = { raw: { width: display.info.width, height: display.info.height, channels: display.info.channels } }
  const picture = await step('picture jpeg', async () => frameImage(await sharp(display.data, raw).jpeg({ quality: 88 }).toBuffer(), 'image/jpeg'))
  const thumb = await step('thumb (resize+jpeg)', async () => frameImage(await sharp(display.data, raw)
    .resize({ width: THUMB_WIDTH, withoutEnlargement: true }).jpeg({ quality: 80 }).toBuffer(), 'image/jpeg'))
  return { thumb, picture }
}

/**
 * The range overlay: the engine's mask (gathered in the measuring pass, on the verdict's own
 * level bins) as a transparent layer the frame page lays over the picture.
 */
async function overlayLayer(analysis: FrameAnalysis, step: Step, scratch?: AnalysisScratch): Promise<FrameImage> {
  const mask = analysis.rangeMask!
  const into = scratch ? (n: number) => scratch.raw('image overlay', n) : undefined
  const layer = await step('overlay layer', () => renderMaskLayer(mask, PALETTE.overlayHigh, PALETTE.overlayLow, into))
  return step('overlay png', async () => frameImage(await sharp(Buffer.from(layer.buffer, layer.byteOffset, layer.byteLength), { raw: { width: mask.width, height: mask.height, channels: 4 } })
    .png({ compressionLevel: PNG_LEVEL.overlay, adaptiveFiltering: false }).toBuffer(), 'image/png'))
}

/**
 * Every image of an analysed frame. With a scratch (the one the analysis used, in a worker
 * thread), the drawn RGBA images are drawn into its buffers, reused from job to job; the
 * encoded images returned are new buffers either way.
 */
export async function renderFrameImages(
  input: FrameInput, analysis: FrameAnalysis, matrix: MatrixName, step: Step = run, scratch?: AnalysisScratch,
): Promise<Record<FrameImageKind, FrameImage>> {
  const w = analysis.waveform
  const v = analysis.vectorscope
  if (!w || !v || !analysis.rangeMask) throw new Error('the analysis was made without keepDensities: no scope data to draw')
  const { thumb, picture } = await renderViewingCopies(input, matrix, step)
  const overlay = await overlayLayer(analysis, step, scratch)
  const out = (name: string): ImageBuffer | undefined => scratch && ((n) => {
    const b = scratch.raw(`image ${name}`, n)
    return new Uint8ClampedArray(b.buffer, b.byteOffset, n)
  })
  const scopes = {
    'waveform-luma': () => renderWaveform(w, 'luma', out('waveform-luma')),
    'waveform-flat': () => renderWaveform(w, 'flat', out('waveform-flat')),
    'waveform-rgb': () => renderWaveform(w, 'rgb', out('waveform-rgb')),
    'vectorscope': () => renderVectorscope(v, { matrix, out: out('vectorscope') }),
  } as const
  const images: Partial<Record<FrameImageKind, FrameImage>> = { thumb, picture, overlay }
  for (const [kind, render] of Object.entries(scopes) as Array<[keyof typeof scopes, () => RgbaImage]>) {
    const img = await step(`${kind} render`, render)
    images[kind] = await step(`${kind} png`, () => png(img, PNG_LEVEL.scope))
  }
  return images as Record<FrameImageKind, FrameImage>
}
