import { makeRowBuffers, makeRowSource } from './decode'
import { resolveMatrix } from './matrix'
import type { FrameInput, MatrixName, RgbaImage } from './types'

/**
 * The picture as display RGBA (R'G'B' clipped), decimated to at most `maxWidth` columns by
 * point sampling: used for thumbnails and viewing copies of inputs that are not display
 * R'G'B' already (raw Y'CbCr, which sharp cannot read, studio range, 16-bit).
 */
export function renderPicture(input: FrameInput, matrix: MatrixName | undefined, maxWidth: number): RgbaImage {
  const src = makeRowSource(input, resolveMatrix(matrix))
  const step = Math.max(1, Math.ceil(src.width / maxWidth))
  const width = Math.floor(src.width / step)
  const height = Math.floor(src.height / step)
  const out = new Uint8ClampedArray(width * height * 4)
  const buf = makeRowBuffers(src.width)
  for (let y = 0; y < height; y++) {
    src.readRow(y * step, buf)
    for (let x = 0; x < width; x++) {
      const o = (y * width + x) * 4
      const sx = x * step
      out[o] = buf.r[sx]! * 255 + 0.5
      out[o + 1] = buf.g[sx]! * 255 + 0.5
      out[o + 2] = buf.b[sx]! * 255 + 0.5
      out[o + 3] = 255
    }
  }
  return { width, height, data: out }
}
