import { MATRICES } from './matrix'
import type { FrameInput, MatrixName, SourceRange } from './types'
import { EngineInputError } from './errors'

export { EngineInputError }

/** One line of the picture in the engine's working form. */
export interface RowBuffers {
  /** Luma as an 8-bit-equivalent studio code (float). */
  y: Float64Array
  /** Pb, Pr (−0.5..0.5 nominal) per sample; 4:2:2 chroma is held over both pixels of a pair. */
  pb: Float64Array
  pr: Float64Array
  /** R', G', B' on the nominal 0..1 scale, beyond kept. */
  r: Float64Array
  g: Float64Array
  b: Float64Array
}

export function makeRowBuffers(width: number): RowBuffers {
  return {
    y: new Float64Array(width), pb: new Float64Array(width), pr: new Float64Array(width),
    r: new Float64Array(width), g: new Float64Array(width), b: new Float64Array(width),
  }
}

export interface RowSource {
  width: number
  height: number
  bitDepth: number
  range: SourceRange
  /** 256 for 8-bit sources, 1024 above: one bin per code of an 8- or 10-bit picture. */
  histBins: 256 | 1024
  rgbCoding: 'source-full' | 'source-studio' | 'studio'
  /** R, G, B histogram bin = round(rgbHistOffset + rgbHistScale · R'). */
  rgbHistScale: number
  rgbHistOffset: number
  /** Luma codes (8-bit equivalent) at the top and bottom of what this source can carry. */
  topCode8: number
  bottomCode8: number
  readRow: (row: number, out: RowBuffers) => void
  /** Chroma samples per pixel as a shift: 0 for 4:4:4 and R'G'B', 1 for 4:2:2. */
  chromaShift: 0 | 1
  /**
   * The fast path of the analysis: luma codes of pixels x0…x1−1 into `y[0…]`, Pb/Pr at the
   * source's own chroma resolution into `pb`/`pr` (so 4:2:2 chroma work is done once per
   * pair). x0 must be a multiple of STRIPE_ALIGN.
   */
  readYcc: (row: number, y: Float64Array, pb: Float64Array, pr: Float64Array, x0: number, x1: number) => void
}

function checkDims(width: number, height: number): void {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new EngineInputError(`width and height must be positive integers (got ${width}×${height})`)
  }
  if (width > 32768 || height > 32768) throw new EngineInputError(`frame ${width}×${height} is larger than 32768 on a side`)
}

function need(actual: number, expected: number, what: string): void {
  if (actual < expected) throw new EngineInputError(`${what}: ${actual} bytes or samples, ${expected} needed`)
}

/** v210 rows hold 48 pixels in each 128 bytes, padded up (the packing's own alignment rule). */
export function v210Stride(width: number): number {
  return Math.ceil(width / 48) * 128
}

/** Stripes of a row start on multiples of this: whole v210 blocks (48 pixels, 128 bytes). */
export const STRIPE_ALIGN = 48

export function makeRowSource(input: FrameInput, matrix: MatrixName): RowSource {
  checkDims(input.width, input.height)
  const m = MATRICES[matrix]
  const { kr, kg, kb, cbDiv, crDiv } = m
  const { width, height } = input

  // Y'CbCr → R'G'B' for every Y'CbCr kind; kept in one place so all kinds agree exactly.
  const fillRgbFromYcc = (o: RowBuffers): void => {
    const { y, pb, pr, r, g, b } = o
    for (let x = 0; x < width; x++) {
      const yu = (y[x]! - 16) / 219
      const rr = yu + crDiv * pr[x]!
      const bb = yu + cbDiv * pb[x]!
      r[x] = rr
      b[x] = bb
      g[x] = (yu - kr * rr - kb * bb) / kg
    }
  }

  switch (input.kind) {
    case 'rgb': {
      const { data, channels, bitDepth, range } = input
      if (channels !== 3 && channels !== 4) throw new EngineInputError(`RGB input needs 3 or 4 channels (got ${channels})`)
      if (bitDepth !== 8 && bitDepth !== 16) throw new EngineInputError(`RGB input must be 8 or 16 bits per channel (got ${bitDepth})`)
      if (bitDepth === 16 && !(data instanceof Uint16Array)) throw new EngineInputError('16-bit RGB input must be a Uint16Array')
      need(data.length, width * height * channels, 'RGB data')
      const maxCode = bitDepth === 8 ? 255 : 65535
      const k = bitDepth === 8 ? 1 : 256
      // full: 0..max = black..white; studio: 16..235 × 2^(n−8) = black..white (ITU-R BT.601-7 Table 3 coding ranges — clause from memory).
      const scale = range === 'full' ? 1 / maxCode : 1 / (219 * k)
      const offset = range === 'full' ? 0 : -16 * k / (219 * k)
      const bins = bitDepth === 8 ? 256 : 1024
      const top = (maxCode * scale + offset)
      const bottom = offset
      const src = data; const w = width; const chans = channels; const sc = scale; const off = offset
      const KR = kr; const KB = kb; const CB = cbDiv; const CR = crDiv
      return {
        width, height, bitDepth, range, histBins: bins,
        rgbCoding: range === 'full' ? 'source-full' : 'source-studio',
        rgbHistScale: range === 'full' ? bins - 1 : 219 * bins / 256,
        rgbHistOffset: range === 'full' ? 0 : 16 * bins / 256,
        topCode8: 16 + 219 * top,
        bottomCode8: 16 + 219 * bottom,
        readRow(row, o) {
          const { y, pb, pr, r, g, b } = o
          // Captured constants as locals: a closure's variables are reloaded from its context
          // on every use in the loop otherwise (about a third of this loop's time).
          const data = src; const width = w; const channels = chans; const scale = sc; const offset = off
          const kr = KR; const kb = KB; const cbDiv = CB; const crDiv = CR
          let i = row * width * channels
          for (let x = 0; x < width; x++, i += channels) {
            const cg = data[i + 1]!
            const dr = (data[i]! - cg) * scale
            const db = (data[i + 2]! - cg) * scale
            const gg = cg * scale + offset
            // Written around G' so that R' = G' = B' gives Y' = G' exactly and grey carries no
            // chroma; Y' − G', and with it Pb and Pr, from the code differences R' − G' and
            // B' − G' alone, which lets fast.ts tabulate chroma per difference pair.
            const t = kr * dr + kb * db
            r[x] = data[i]! * scale + offset
            g[x] = gg
            b[x] = data[i + 2]! * scale + offset
            y[x] = 16 + 219 * (gg + t)
            pb[x] = (db - t) / cbDiv
            pr[x] = (dr - t) / crDiv
          }
        },
        chromaShift: 0,
        readYcc(row, y, pb, pr, x0, x1) {
          const data = src; const width = w; const channels = chans; const scale = sc; const offset = off
          const kr = KR; const kb = KB; const cbDiv = CB; const crDiv = CR
          let i = (row * width + x0) * channels
          for (let x = 0, n = x1 - x0; x < n; x++, i += channels) {
            const cg = data[i + 1]!
            const dr = (data[i]! - cg) * scale
            const db = (data[i + 2]! - cg) * scale
            const t = kr * dr + kb * db
            y[x] = 16 + 219 * (cg * scale + offset + t)
            pb[x] = (db - t) / cbDiv
            pr[x] = (dr - t) / crDiv
          }
        },
      }
    }
    case 'uyvy': {
      const { data } = input
      if (width % 2 !== 0) throw new EngineInputError(`UYVY width must be even (got ${width})`)
      need(data.length, width * height * 2, 'UYVY data')
      return {
        ...ycc8Common(width, height),
        readRow(row, o) {
          const { y, pb, pr } = o
          let i = row * width * 2
          for (let x = 0; x < width; x += 2, i += 4) {
            const cb = (data[i]! - 128) / 224
            const cr = (data[i + 2]! - 128) / 224
            y[x] = data[i + 1]!
            y[x + 1] = data[i + 3]!
            pb[x] = cb; pb[x + 1] = cb
            pr[x] = cr; pr[x + 1] = cr
          }
          fillRgbFromYcc(o)
        },
        chromaShift: 1,
        readYcc(row, y, pb, pr, x0, x1) {
          let i = (row * width + x0) * 2
          for (let x = 0, c = 0, n = x1 - x0; x < n; x += 2, c++, i += 4) {
            pb[c] = (data[i]! - 128) / 224
            y[x] = data[i + 1]!
            pr[c] = (data[i + 2]! - 128) / 224
            y[x + 1] = data[i + 3]!
          }
        },
      }
    }
    case 'v210': {
      const { data } = input
      if (width % 2 !== 0) throw new EngineInputError(`v210 width must be even (got ${width})`)
      const stride = v210Stride(width)
      need(data.length, stride * height, 'v210 data')
      const groups = Math.ceil(width / 6)
      // Scratch for one line of 10-bit samples, so a partial last group needs no special case.
      const ys = new Uint16Array(groups * 6)
      const cbs = new Uint16Array(groups * 3)
      const crs = new Uint16Array(groups * 3)
      return {
        ...ycc10Common(width, height),
        readRow(row, o) {
          unpack(row, 0, groups)
          const { y, pb, pr } = o
          for (let x = 0; x < width; x += 2) {
            const c = x >> 1
            const cb = (cbs[c]! - 512) / 896
            const cr = (crs[c]! - 512) / 896
            y[x] = ys[x]! / 4
            y[x + 1] = ys[x + 1]! / 4
            pb[x] = cb; pb[x + 1] = cb
            pr[x] = cr; pr[x + 1] = cr
          }
          fillRgbFromYcc(o)
        },
        chromaShift: 1,
        readYcc(row, y, pb, pr, x0, x1) {
          unpack(row, x0 / 6, Math.ceil(x1 / 6))
          for (let x = 0, n = x1 - x0; x < n; x++) y[x] = ys[x0 + x]! * 0.25
          for (let c = 0, c0 = x0 >> 1, n = (x1 - x0) >> 1; c < n; c++) {
            pb[c] = (cbs[c0 + c]! - 512) / 896
            pr[c] = (crs[c0 + c]! - 512) / 896
          }
        },
      }
      function unpack(row: number, g0: number, g1: number): void {
        let i = row * stride + g0 * 16
        for (let gI = g0; gI < g1; gI++, i += 16) {
          const w0 = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)
          const w1 = data[i + 4]! | (data[i + 5]! << 8) | (data[i + 6]! << 16) | (data[i + 7]! << 24)
          const w2 = data[i + 8]! | (data[i + 9]! << 8) | (data[i + 10]! << 16) | (data[i + 11]! << 24)
          const w3 = data[i + 12]! | (data[i + 13]! << 8) | (data[i + 14]! << 16) | (data[i + 15]! << 24)
          const yo = gI * 6
          const co = gI * 3
          cbs[co] = w0 & 1023; ys[yo] = (w0 >>> 10) & 1023; crs[co] = (w0 >>> 20) & 1023
          ys[yo + 1] = w1 & 1023; cbs[co + 1] = (w1 >>> 10) & 1023; ys[yo + 2] = (w1 >>> 20) & 1023
          crs[co + 1] = w2 & 1023; ys[yo + 3] = (w2 >>> 10) & 1023; cbs[co + 2] = (w2 >>> 20) & 1023
          ys[yo + 4] = w3 & 1023; crs[co + 2] = (w3 >>> 10) & 1023; ys[yo + 5] = (w3 >>> 20) & 1023
        }
      }
    }
    case 'planar': {
      const { y: yp, cb: cbp, cr: crp, bitDepth, subsampling } = input
      if (bitDepth !== 8 && bitDepth !== 10) throw new EngineInputError(`planar input must be 8 or 10 bits (got ${bitDepth})`)
      if (subsampling !== '422' && subsampling !== '444') throw new EngineInputError(`planar subsampling must be 422 or 444 (got ${String(subsampling)})`)
      const cw = subsampling === '422' ? Math.ceil(width / 2) : width
      need(yp.length, width * height, 'Y plane')
      need(cbp.length, cw * height, 'Cb plane')
      need(crp.length, cw * height, 'Cr plane')
      const div = bitDepth === 8 ? 1 : 4
      const cCentre = 128 * div
      const cSpan = 224 * div
      const shift = subsampling === '422' ? 1 : 0
      return {
        ...(bitDepth === 8 ? ycc8Common(width, height) : ycc10Common(width, height)),
        readRow(row, o) {
          const { y, pb, pr } = o
          const yo = row * width
          const co = row * cw
          for (let x = 0; x < width; x++) {
            const c = co + (x >> shift)
            y[x] = yp[yo + x]! / div
            pb[x] = (cbp[c]! - cCentre) / cSpan
            pr[x] = (crp[c]! - cCentre) / cSpan
          }
          fillRgbFromYcc(o)
        },
        chromaShift: shift as 0 | 1,
        readYcc(row, y, pb, pr, x0, x1) {
          // Captured constants as locals (see the R'G'B' case).
          const Y = yp; const CB = cbp; const CR = crp; const centre = cCentre; const span = cSpan
          const yo = row * width + x0
          const co = row * cw + (x0 >> shift)
          const inv = 1 / div
          for (let x = 0, n = x1 - x0; x < n; x++) y[x] = Y[yo + x]! * inv
          for (let c = 0, n = ((x1 - x0) + shift) >> shift; c < n; c++) {
            pb[c] = (CB[co + c]! - centre) / span
            pr[c] = (CR[co + c]! - centre) / span
          }
        },
      }
    }
    default: {
      const kind = (input as { kind?: unknown }).kind
      throw new EngineInputError(`unknown input kind ${String(kind)}`)
    }
  }
}

// Codes 0 and 255 (0–3 and 1020–1023 at 10 bits) are reserved for timing (BT.601 Table 3),
// so the highest level a Y'CbCr source can carry is 254 (1019), the lowest 1 (4).
function ycc8Common(width: number, height: number) {
  return {
    width, height, bitDepth: 8, range: 'studio' as const, histBins: 256 as const,
    rgbCoding: 'studio' as const, rgbHistScale: 219, rgbHistOffset: 16,
    topCode8: 254, bottomCode8: 1,
  }
}

function ycc10Common(width: number, height: number) {
  return {
    width, height, bitDepth: 10, range: 'studio' as const, histBins: 1024 as const,
    rgbCoding: 'studio' as const, rgbHistScale: 876, rgbHistOffset: 64,
    topCode8: 1019 / 4, bottomCode8: 1,
  }
}

/** Packs 10-bit Y'CbCr 4:2:2 samples as v210 (for tests and tools that need to write it). */
export function packV210(y: ArrayLike<number>, cb: ArrayLike<number>, cr: ArrayLike<number>, width: number, height: number): Uint8Array {
  const stride = v210Stride(width)
  const out = new Uint8Array(stride * height)
  const dv = new DataView(out.buffer)
  const cw = width / 2
  const groups = Math.ceil(width / 6)
  for (let row = 0; row < height; row++) {
    const Y = (i: number) => (i < width ? y[row * width + i]! : 0) & 1023
    const B = (i: number) => (i < cw ? cb[row * cw + i]! : 0) & 1023
    const R = (i: number) => (i < cw ? cr[row * cw + i]! : 0) & 1023
    for (let g = 0; g < groups; g++) {
      const o = row * stride + g * 16
      const p = g * 6
      const c = g * 3
      dv.setUint32(o, B(c) | (Y(p) << 10) | (R(c) << 20), true)
      dv.setUint32(o + 4, Y(p + 1) | (B(c + 1) << 10) | (Y(p + 2) << 20), true)
      dv.setUint32(o + 8, R(c + 1) | (Y(p + 3) << 10) | (B(c + 2) << 20), true)
      dv.setUint32(o + 12, Y(p + 4) | (R(c + 2) << 10) | (Y(p + 5) << 20), true)
    }
  }
  return out
}
