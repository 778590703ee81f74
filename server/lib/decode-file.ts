import { readFile } from 'node:fs/promises'
import sharp from 'sharp'
import type { Metadata } from 'sharp'
import { v210Stride } from '../../shared/engine/decode'
import type { FrameInput, SourceRange } from '../../shared/engine/types'

/** Largest picture decoded: refuses decompression bombs before libvips allocates (libvips' limitInputPixels, checked before it allocates). */
export const MAX_INPUT_PIXELS = 80_000_000

export type RawKind = 'uyvy' | 'v210'

export interface DecodeFileOptions {
  /** Source range of RGB stills; raw Y'CbCr is always studio range. */
  range?: SourceRange
  raw?: RawKind
  width?: number
  height?: number
  maxPixels?: number
}

/** A file the engine cannot read; the message is meant for the person who sent it. */
export class DecodeFileError extends Error {
  override name = 'DecodeFileError'
}

const STILL_FORMATS = new Set(['png', 'tiff', 'jpeg', 'webp'])

export async function decodeFile(path: string, opts: DecodeFileOptions = {}): Promise<FrameInput> {
  let bytes: Buffer
  try {
    bytes = await readFile(path)
  }
  catch (e) {
    throw new DecodeFileError(`cannot read ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`)
  }
  return decodeBytes(bytes, opts)
}

export async function decodeBytes(bytes: Uint8Array, opts: DecodeFileOptions = {}): Promise<FrameInput> {
  if (opts.raw) return decodeRaw(bytes, opts.raw, opts.width, opts.height, opts.maxPixels ?? MAX_INPUT_PIXELS)
  return decodeStill(bytes, opts.range ?? 'full', opts.maxPixels ?? MAX_INPUT_PIXELS)
}

export function decodeRaw(bytes: Uint8Array, kind: RawKind, width: number | undefined, height: number | undefined, maxPixels = MAX_INPUT_PIXELS): FrameInput {
  if (!width || !height || !Number.isInteger(width) || !Number.isInteger(height) || width < 2 || height < 1) {
    throw new DecodeFileError(`raw ${kind} needs --width and --height as positive integers`)
  }
  if (width % 2) throw new DecodeFileError(`raw ${kind} width must be even (4:2:2 pairs), got ${width}`)
  if (width * height > maxPixels) throw new DecodeFileError(`${width}×${height} is more than ${maxPixels} pixels`)
  const expected = kind === 'uyvy' ? width * height * 2 : v210Stride(width) * height
  if (bytes.length !== expected) {
    throw new DecodeFileError(`raw ${kind} ${width}×${height} should be ${expected} bytes, the file has ${bytes.length}`)
  }
  const data = new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.length)
  return { kind, data, width, height }
}

export async function decodeStill(bytes: Uint8Array, range: SourceRange, maxPixels = MAX_INPUT_PIXELS): Promise<FrameInput> {
  // A level check measures the codes as written. An embedded ICC profile (Display P3, a camera
  // profile) would otherwise have libvips convert the codes to sRGB before they are measured.
  const open = () => sharp(bytes, { limitInputPixels: maxPixels, failOn: 'error', ignoreIcc: true })
  let meta: Metadata
  try {
    meta = await open().metadata()
  }
  catch (e) {
    throw new DecodeFileError(`not a readable picture: ${(e as Error).message}`)
  }
  if (!meta.format || !STILL_FORMATS.has(meta.format)) {
    throw new DecodeFileError(`unsupported format ${meta.format ?? 'unknown'} (PNG, TIFF, JPEG or WebP, or raw UYVY/v210 with --raw)`)
  }
  if (!meta.width || !meta.height) throw new DecodeFileError('picture has no size')
  if (meta.width * meta.height > maxPixels) throw new DecodeFileError(`${meta.width}×${meta.height} is more than ${maxPixels} pixels`)
  // CMYK codes are ink amounts, not R'G'B' video levels; any conversion would invent the levels.
  if (meta.space === 'cmyk') {
    throw new DecodeFileError('the picture is CMYK: a level check needs R\'G\'B\' or greyscale codes (export the frame as RGB)')
  }
  const deep = meta.depth !== undefined && meta.depth !== 'uchar' && meta.depth !== 'char'
  try {
    if (deep) {
      // A plain .raw({ depth: 'ushort' }) scales 16-bit input down to 0–255 (sharp 0.35): keep
      // the pipeline in rgb16 so the codes arrive untouched (greyscale is copied to R, G and B).
      const { data, info } = await open().pipelineColourspace('rgb16').toColourspace('rgb16').removeAlpha()
        .raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true })
      if (info.channels !== 3) throw new DecodeFileError(`expected 3 colour channels after conversion, got ${info.channels}`)
      // Uint16Array needs an even byte offset; a pooled Buffer may not have one.
      const words = data.byteOffset % 2 === 0
        ? new Uint16Array(data.buffer, data.byteOffset, data.length / 2)
        : new Uint16Array(Uint8Array.prototype.slice.call(data).buffer)
      return { kind: 'rgb', data: words, width: info.width, height: info.height, channels: 3, bitDepth: 16, range }
    }
    // With the profile ignored, sRGB is no conversion for R'G'B' and a copy to R, G, B for grey.
    const { data, info } = await open().toColourspace('srgb').removeAlpha().raw().toBuffer({ resolveWithObject: true })
    if (info.channels !== 3) throw new DecodeFileError(`expected 3 colour channels after conversion, got ${info.channels}`)
    const bytes8 = new Uint8Array(data.buffer, data.byteOffset, data.length)
    return { kind: 'rgb', data: bytes8, width: info.width, height: info.height, channels: 3, bitDepth: 8, range }
  }
  catch (e) {
    if (e instanceof DecodeFileError) throw e
    throw new DecodeFileError(`cannot decode the picture: ${(e as Error).message}`)
  }
}
