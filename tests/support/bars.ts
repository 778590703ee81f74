// Colour-bar frames built by the tests from the published codes, with line-up errors applied
// in code. No pixel of these comes from another program.
//
// Sources: bar codes of ITU-R BT.801-1 Table 1 (BT.601, 8- and 10-bit; table number from
// memory) and SMPTE RP 219 / ITU-R BT.2111 Table 2 (BT.709, computed from the BT.709
// equations); EG 1 layout of the split field (seven bars over two thirds of the height, the
// reverse-blue row to three quarters, −I, white, +Q and PLUGE below — SMPTE EG 1, memory);
// RP 219 layout (40 % grey sides of 1/8 width, bars to 7/12 of the height, PLUGE −2/0/+2/0/+4 %
// in the bottom quarter — SMPTE RP 219, memory). Composite weighting U = 0.492111 (B'−Y'),
// V = 0.877283 (R'−Y') (SMPTE 170M, memory).
import { barRgb, MATRICES, packV210, quantiseYCbCr, rgbToYPbPr, U_WEIGHT, V_WEIGHT } from '../../shared/engine'
import type { BarName, FrameInput, MatrixName } from '../../shared/engine'

export type Codes = [number, number, number]

/** BT.601 100/0/75/0 bars (BT.801-1 Table 1): 8-bit and 10-bit Y/Cb/Cr. */
export const BT801_75: Record<BarName | 'grey', [Codes, Codes]> = {
  white: [[235, 128, 128], [940, 512, 512]],
  grey: [[180, 128, 128], [721, 512, 512]],
  yellow: [[162, 44, 142], [646, 176, 567]],
  cyan: [[131, 156, 44], [525, 625, 176]],
  green: [[112, 72, 58], [450, 289, 231]],
  magenta: [[84, 184, 198], [335, 735, 793]],
  red: [[65, 100, 212], [260, 399, 848]],
  blue: [[35, 212, 114], [139, 848, 457]],
  black: [[16, 128, 128], [64, 512, 512]],
}
/** BT.601 100/0/100/0 bars (BT.801-1 Table 1). */
export const BT801_100: Record<Exclude<BarName, 'black' | 'white'>, [Codes, Codes]> = {
  yellow: [[210, 16, 146], [840, 64, 585]],
  cyan: [[170, 166, 16], [678, 663, 64]],
  green: [[145, 54, 34], [578, 215, 137]],
  magenta: [[106, 202, 222], [426, 809, 887]],
  red: [[81, 90, 240], [326, 361, 960]],
  blue: [[41, 240, 110], [164, 960, 439]],
}
/** BT.709 75 % bars, 8-bit (RP 219 / BT.2111 Table 2, computed from the BT.709 equations). */
export const RP219_75_8: Record<Exclude<BarName, 'black' | 'white'>, Codes> = {
  yellow: [168, 44, 136], cyan: [145, 147, 44], green: [133, 63, 52],
  magenta: [63, 193, 204], red: [51, 109, 212], blue: [28, 212, 120],
}

/** A colour as exact Y' (0..1 above black, beyond kept) and Pb/Pr. */
export interface Ypp { y: number, pb: number, pr: number }

/** Line-up errors applied to exact bars: gain of luma above black, chroma gain, hue rotation in U/V, black offset, setup. */
export interface LineupErrors {
  lumaGain?: number
  chromaGain?: number
  /** Degrees, rotating the chroma vector in the composite U/V plane (not in Cb/Cr). */
  hueDeg?: number
  blackOffsetIre?: number
  /**
   * The 7.5 IRE pedestal carried in the codes (an NTSC source digitised without removing
   * setup): Y' → 0.075 + 0.925·Y', chroma · 0.925, so black sits at code 32.4 instead of 16.
   */
  setupInCodes?: boolean
}

export function applyErrors(c: Ypp, e: LineupErrors, matrix: MatrixName): Ypp {
  const m = MATRICES[matrix]
  // Into U/V, rotate and scale there, and back: a hue error is a rotation of the composite vector.
  let u = U_WEIGHT * m.cbDiv * c.pb
  let v = V_WEIGHT * m.crDiv * c.pr
  const th = (e.hueDeg ?? 0) * Math.PI / 180
  ;[u, v] = [u * Math.cos(th) - v * Math.sin(th), u * Math.sin(th) + v * Math.cos(th)]
  const k = e.chromaGain ?? 1
  let y = c.y * (e.lumaGain ?? 1)
  // IRE with setup = 7.5 + 92.5·Y'; levels are moved on that scale.
  if (e.setupInCodes) {
    y = 0.075 + 0.925 * y
    u *= 0.925; v *= 0.925
  }
  y += (e.blackOffsetIre ?? 0) / 92.5
  return { y, pb: k * u / (U_WEIGHT * m.cbDiv), pr: k * v / (V_WEIGHT * m.crDiv) }
}

export function barYpp(name: BarName | 'grey', amplitude: number, matrix: MatrixName): Ypp {
  const c = name === 'grey' ? { r: 0.75, g: 0.75, b: 0.75 } : barRgb(name, amplitude)
  const p = rgbToYPbPr(c.r, c.g, c.b, matrix)
  return { y: p.y, pb: p.pb, pr: p.pr }
}

/** A colour from its amplitude (IRE p-p on the setup scale), phase and luma (IRE, setup scale). */
export function vectorYpp(ppIre: number, phaseDeg: number, lumaIre: number, matrix: MatrixName): Ypp {
  const m = MATRICES[matrix]
  const c = ppIre / 2 / 92.5
  const th = phaseDeg * Math.PI / 180
  return { y: (lumaIre - 7.5) / 92.5, pb: c * Math.cos(th) / (U_WEIGHT * m.cbDiv), pr: c * Math.sin(th) / (V_WEIGHT * m.crDiv) }
}

const greyIre = (ire: number): Ypp => ({ y: (ire - 7.5) / 92.5, pb: 0, pr: 0 })

/** A rectangle of the pattern in fractions of the frame, and what fills it. */
export interface Patch { x0: number, x1: number, y0: number, y1: number, fill: Ypp | Codes }

const ORDER: Array<BarName | 'grey'> = ['grey', 'yellow', 'cyan', 'green', 'magenta', 'red', 'blue']

/** SMPTE EG 1 split field, colours given per name (codes or exact). */
export function splitFieldPatches(colour: (name: BarName | 'grey') => Ypp | Codes, extra: (ypp: Ypp) => Ypp | Codes, matrix: MatrixName = '601'): Patch[] {
  const p: Patch[] = []
  const bw = 1 / 7
  ORDER.forEach((n, k) => p.push({ x0: k * bw, x1: (k + 1) * bw, y0: 0, y1: 2 / 3, fill: colour(n) }))
  const rev: Array<BarName | 'grey'> = ['blue', 'black', 'magenta', 'black', 'cyan', 'black', 'grey']
  rev.forEach((n, k) => p.push({ x0: k * bw, x1: (k + 1) * bw, y0: 2 / 3, y1: 3 / 4, fill: colour(n) }))
  // Bottom row: −I and +Q at 40 IRE p-p on black (I axis at 123°, Q at 33°: common practice),
  // 100 % white, black, PLUGE at 3.5 / 7.5 / 11.5 IRE (EG 1 practice, memory), black.
  const pw = 5 / 4 * bw
  p.push({ x0: 0, x1: pw, y0: 3 / 4, y1: 1, fill: extra(vectorYpp(40, 303, 7.5, matrix)) })
  p.push({ x0: pw, x1: 2 * pw, y0: 3 / 4, y1: 1, fill: colour('white') })
  p.push({ x0: 2 * pw, x1: 3 * pw, y0: 3 / 4, y1: 1, fill: extra(vectorYpp(40, 33, 7.5, matrix)) })
  p.push({ x0: 3 * pw, x1: 5 * bw, y0: 3 / 4, y1: 1, fill: colour('black') })
  p.push({ x0: 5 * bw, x1: 5 * bw + bw / 3, y0: 3 / 4, y1: 1, fill: extra(greyIre(3.5)) })
  p.push({ x0: 5 * bw + bw / 3, x1: 5 * bw + 2 * bw / 3, y0: 3 / 4, y1: 1, fill: colour('black') })
  p.push({ x0: 5 * bw + 2 * bw / 3, x1: 6 * bw, y0: 3 / 4, y1: 1, fill: extra(greyIre(11.5)) })
  p.push({ x0: 6 * bw, x1: 1, y0: 3 / 4, y1: 1, fill: colour('black') })
  return p
}

/** Full field: the seven bars (optionally with black as an eighth) over the whole height. */
export function fullFieldPatches(colour: (name: BarName | 'grey') => Ypp | Codes, opts: { first?: 'grey' | 'white', withBlack?: boolean } = {}): Patch[] {
  const names: Array<BarName | 'grey'> = [opts.first ?? 'grey', ...ORDER.slice(1)]
  if (opts.withBlack) names.push('black')
  const bw = 1 / names.length
  return names.map((n, k) => ({ x0: k * bw, x1: (k + 1) * bw, y0: 0, y1: 1, fill: colour(n) }))
}

/** SMPTE RP 219 layout (simplified below the bars: the rows the check reads are exact). */
export function rp219Patches(colour: (name: BarName | 'grey') => Ypp | Codes, extra: (ypp: Ypp) => Ypp | Codes): Patch[] {
  const p: Patch[] = []
  const side = 1 / 8
  const bw = 3 / 4 / 7
  const g40 = extra({ y: 0.4, pb: 0, pr: 0 })
  p.push({ x0: 0, x1: side, y0: 0, y1: 7 / 12, fill: g40 })
  ORDER.forEach((n, k) => p.push({ x0: side + k * bw, x1: side + (k + 1) * bw, y0: 0, y1: 7 / 12, fill: colour(n) }))
  p.push({ x0: 1 - side, x1: 1, y0: 0, y1: 7 / 12, fill: g40 })
  // Second and third rows: 100 % cyan, 75 % white, 100 % blue; 100 % yellow, black, 100 % red.
  p.push({ x0: 0, x1: side, y0: 7 / 12, y1: 8 / 12, fill: extra(barYpp('cyan', 1, '709')) })
  p.push({ x0: side, x1: 1 - side, y0: 7 / 12, y1: 8 / 12, fill: colour('grey') })
  p.push({ x0: 1 - side, x1: 1, y0: 7 / 12, y1: 8 / 12, fill: extra(barYpp('blue', 1, '709')) })
  p.push({ x0: 0, x1: side, y0: 8 / 12, y1: 9 / 12, fill: extra(barYpp('yellow', 1, '709')) })
  p.push({ x0: side, x1: 1 - side, y0: 8 / 12, y1: 9 / 12, fill: colour('black') })
  p.push({ x0: 1 - side, x1: 1, y0: 8 / 12, y1: 9 / 12, fill: extra(barYpp('red', 1, '709')) })
  // Bottom: 15 % grey, black, 100 % white, black, PLUGE −2 %, 0, +2 %, 0, +4 %, black, 15 % grey.
  const g15 = extra({ y: 0.15, pb: 0, pr: 0 })
  const cuts = [0, side, side + 1.5 * bw, side + 3.5 * bw, side + 4.5 * bw]
  p.push({ x0: 0, x1: side, y0: 9 / 12, y1: 1, fill: g15 })
  p.push({ x0: cuts[1]!, x1: cuts[2]!, y0: 9 / 12, y1: 1, fill: colour('black') })
  p.push({ x0: cuts[2]!, x1: cuts[3]!, y0: 9 / 12, y1: 1, fill: colour('white') })
  p.push({ x0: cuts[3]!, x1: cuts[4]!, y0: 9 / 12, y1: 1, fill: colour('black') })
  const pl = [-0.02, 0, 0.02, 0, 0.04]
  pl.forEach((lv, k) => p.push({ x0: cuts[4]! + k * bw / 3, x1: cuts[4]! + (k + 1) * bw / 3, y0: 9 / 12, y1: 1, fill: lv === 0 ? colour('black') : extra({ y: lv, pb: 0, pr: 0 }) }))
  p.push({ x0: cuts[4]! + 5 * bw / 3, x1: 1 - side, y0: 9 / 12, y1: 1, fill: colour('black') })
  p.push({ x0: 1 - side, x1: 1, y0: 9 / 12, y1: 1, fill: g15 })
  return p
}

function codesOf(fill: Ypp | Codes, bits: 8 | 10): Codes {
  if (Array.isArray(fill)) return fill
  const q = quantiseYCbCr({ y: fill.y, pb: fill.pb, pr: fill.pr }, bits)
  const max = bits === 8 ? 254 : 1019
  const min = bits === 8 ? 1 : 4
  const cl = (v: number) => Math.min(max, Math.max(min, v))
  return [cl(q.y), cl(q.cb), cl(q.cr)]
}

/** Y/Cb/Cr planes (4:2:2, chroma from the left pixel of each pair) of patches. */
export function paint(patches: Patch[], width: number, height: number, bits: 8 | 10) {
  const y = new Uint16Array(width * height)
  const cb = new Uint16Array(width / 2 * height)
  const cr = new Uint16Array(width / 2 * height)
  for (const p of patches) {
    const [Y, B, R] = codesOf(p.fill, bits)
    const x0 = Math.round(p.x0 * width); const x1 = Math.round(p.x1 * width)
    const y0 = Math.round(p.y0 * height); const y1 = Math.round(p.y1 * height)
    for (let r = y0; r < y1; r++) {
      for (let x = x0; x < x1; x++) {
        y[r * width + x] = Y
        if (x % 2 === 0) { cb[r * width / 2 + x / 2] = B; cr[r * width / 2 + x / 2] = R }
      }
    }
  }
  return { y, cb, cr }
}

export function toUyvy(planes: ReturnType<typeof paint>, width: number, height: number): Uint8Array {
  const out = new Uint8Array(width * height * 2)
  for (let r = 0; r < height; r++) {
    for (let x = 0; x < width; x += 2) {
      const o = (r * width + x) * 2
      out[o] = planes.cb[r * width / 2 + x / 2]!; out[o + 1] = planes.y[r * width + x]!
      out[o + 2] = planes.cr[r * width / 2 + x / 2]!; out[o + 3] = planes.y[r * width + x + 1]!
    }
  }
  return out
}

export function uyvyFrame(patches: Patch[], width: number, height: number): FrameInput {
  return { kind: 'uyvy', data: toUyvy(paint(patches, width, height, 8), width, height), width, height }
}

export function v210Frame(patches: Patch[], width: number, height: number): FrameInput & { kind: 'v210' } {
  const p = paint(patches, width, height, 10)
  return { kind: 'v210' as const, data: packV210(p.y, p.cb, p.cr, width, height), width, height }
}

/** R'G'B' 8-bit full range (0..255 = black..white), each patch from its exact Y'PbPr. */
export function rgb8Frame(patches: Array<Patch & { fill: Ypp }>, width: number, height: number, matrix: MatrixName = '601'): FrameInput & { kind: 'rgb' } {
  const data = new Uint8Array(width * height * 3)
  const m = MATRICES[matrix]
  for (const p of patches) {
    const r = p.fill.y + m.crDiv * p.fill.pr
    const b = p.fill.y + m.cbDiv * p.fill.pb
    const g = (p.fill.y - m.kr * r - m.kb * b) / m.kg
    const q = (v: number) => Math.min(255, Math.max(0, Math.round(v * 255)))
    const x0 = Math.round(p.x0 * width); const x1 = Math.round(p.x1 * width)
    const y0 = Math.round(p.y0 * height); const y1 = Math.round(p.y1 * height)
    for (let row = y0; row < y1; row++) {
      for (let x = x0; x < x1; x++) {
        const o = (row * width + x) * 3
        data[o] = q(r); data[o + 1] = q(g); data[o + 2] = q(b)
      }
    }
  }
  return { kind: 'rgb', data, width, height, channels: 3, bitDepth: 8, range: 'full' }
}

/** Exact 75 % split-field bars with errors applied, as a colour function for the painters. */
export function exactColour(amplitude: number, matrix: MatrixName, e: LineupErrors = {}) {
  return (name: BarName | 'grey'): Ypp => applyErrors(barYpp(name, amplitude, matrix), e, matrix)
}
