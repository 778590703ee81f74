// The sheet's "picture with range marks": the frame itself with the transparent marks layer
// the analyse job stored laid over it, at the frame's own aspect ratio. (The layer alone is
// marks on nothing; the PDF needs them composed, as the frame page composes them in CSS.)
import sharp, { type OverlayOptions, type Sharp } from 'sharp'
import type { MatrixName } from '../../shared/engine/types'
import { decodeBytes } from '../../server/lib/decode-file'
import { renderPicture } from '../../shared/engine/index'

/** Wide enough for a full-width picture on an A4 page at print resolution, small in the PDF. */
export const SHEET_PICTURE_WIDTH = 1400

export interface SheetPictureSource {
  frame: { format: string; width: number; height: number }
  reel: { sourceRange: 'full' | 'studio'; matrix: MatrixName }
  /** The viewing copy the server may already have made (JPEG), else null. */
  viewing: () => Promise<Uint8Array | null>
  /** The uploaded file. */
  original: () => Promise<Uint8Array>
  /** The stored marks layer (PNG with alpha), or null when there is none. */
  overlay: () => Promise<Uint8Array | null>
  maxPixels: number
}

/** JPEG of the picture with its marks, `SHEET_PICTURE_WIDTH` (or the frame's width if less) wide. */
export async function sheetPicture(src: SheetPictureSource): Promise<{ jpeg: Buffer; width: number; height: number }> {
  const { frame } = src
  const width = Math.min(SHEET_PICTURE_WIDTH, frame.width)
  const height = Math.max(1, Math.round((width * frame.height) / frame.width))
  const viewing = await src.viewing()
  let image: Sharp
  if (viewing) {
    image = sharp(Buffer.from(viewing))
  } else {
    const raw = frame.format === 'uyvy' || frame.format === 'v210' ? frame.format : undefined
    const input = await decodeBytes(await src.original(), {
      range: src.reel.sourceRange, raw, width: frame.width, height: frame.height, maxPixels: src.maxPixels,
    })
    const rgba = renderPicture(input, src.reel.matrix, width * 2)
    image = sharp(Buffer.from(rgba.data.buffer, rgba.data.byteOffset, rgba.data.byteLength), {
      raw: { width: rgba.width, height: rgba.height, channels: 4 },
    })
  }
  // The frame's own shape, whatever size the copy was made at.
  const base = await image.removeAlpha().resize({ width, height, fit: 'fill' }).png().toBuffer()
  const marks = await src.overlay()
  const layers: OverlayOptions[] = []
  if (marks) {
    // Each mark is a block of the frame: nearest-neighbour keeps the blocks crisp.
    const scaled = await sharp(Buffer.from(marks)).resize({ width, height, fit: 'fill', kernel: 'nearest' }).png().toBuffer()
    layers.push({ input: scaled, left: 0, top: 0 })
  }
  const jpeg = await sharp(base).composite(layers).jpeg({ quality: 88 }).toBuffer()
  return { jpeg, width, height }
}
