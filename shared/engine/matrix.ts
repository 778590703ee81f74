import { EngineInputError } from './errors'
import type { MatrixName } from './types'

export interface MatrixCoefficients {
  kr: number
  kg: number
  kb: number
  /** Pb = (B' - Y') / cbDiv, Pr = (R' - Y') / crDiv, i.e. 2(1 - Kb) and 2(1 - Kr). */
  cbDiv: number
  crDiv: number
}

// ITU-R BT.601-7 §2.5 (clause number from memory) and ITU-R BT.709-6 Part 2 items 3.2–3.4.
export const MATRICES: Record<MatrixName, MatrixCoefficients> = {
  601: { kr: 0.299, kg: 0.587, kb: 0.114, cbDiv: 1.772, crDiv: 1.402 },
  709: { kr: 0.2126, kg: 0.7152, kb: 0.0722, cbDiv: 1.8556, crDiv: 1.5748 },
}

// SMPTE 170M weighting of the colour-difference signals for the composite equivalent
// (values from memory).
export const U_WEIGHT = 0.492111
export const V_WEIGHT = 0.877283

export interface YPbPr { y: number, pb: number, pr: number }

export function rgbToYPbPr(r: number, g: number, b: number, matrix: MatrixName = '601'): YPbPr {
  const m = MATRICES[matrix]
  const y = m.kr * r + m.kg * g + m.kb * b
  return { y, pb: (b - y) / m.cbDiv, pr: (r - y) / m.crDiv }
}

export function yPbPrToRgb(y: number, pb: number, pr: number, matrix: MatrixName = '601'): { r: number, g: number, b: number } {
  const m = MATRICES[matrix]
  const r = y + m.crDiv * pr
  const b = y + m.cbDiv * pb
  return { r, g: (y - m.kr * r - m.kb * b) / m.kg, b }
}

/** Studio-range codes at n bits, rounded as BT.601 §2.5 quantises (each depth from the exact value). */
export function quantiseYCbCr(p: YPbPr, bits: 8 | 10 = 8): { y: number, cb: number, cr: number } {
  const k = 2 ** (bits - 8)
  return {
    y: Math.round((219 * p.y + 16) * k),
    cb: Math.round((224 * p.pb + 128) * k),
    cr: Math.round((224 * p.pr + 128) * k),
  }
}

export interface CompositeEquivalent {
  u: number
  v: number
  /** Chroma amplitude √(U²+V²) on the Y' scale (0..1 = black..white). */
  c: number
  /** atan2(V, U) in degrees, 0..360, from the +(B'−Y') axis. */
  phaseDeg: number
}

export function compositeFromPbPr(pb: number, pr: number, matrix: MatrixName = '601'): CompositeEquivalent {
  const m = MATRICES[matrix]
  const u = U_WEIGHT * m.cbDiv * pb
  const v = V_WEIGHT * m.crDiv * pr
  let phaseDeg = Math.atan2(v, u) * 180 / Math.PI
  if (phaseDeg < 0) phaseDeg += 360
  return { u, v, c: Math.hypot(u, v), phaseDeg }
}

export const BAR_NAMES = ['white', 'yellow', 'cyan', 'green', 'magenta', 'red', 'blue', 'black'] as const
export type BarName = typeof BAR_NAMES[number]

/** R'G'B' (0..1) of the classic bar order at a given amplitude (0.75 or 1). */
export function barRgb(name: BarName, amplitude: number): { r: number, g: number, b: number } {
  const on: Record<BarName, [number, number, number]> = {
    white: [1, 1, 1], yellow: [1, 1, 0], cyan: [0, 1, 1], green: [0, 1, 0],
    magenta: [1, 0, 1], red: [1, 0, 0], blue: [0, 0, 1], black: [0, 0, 0],
  }
  const [r, g, b] = on[name]
  return { r: r * amplitude, g: g * amplitude, b: b * amplitude }
}

/** Vectorscope targets (U, V) of the six chromatic bars at a given amplitude. */
export function barTargets(amplitude: number, matrix: MatrixName = '601'): Array<{ name: BarName, u: number, v: number }> {
  return BAR_NAMES.filter(n => n !== 'white' && n !== 'black').map((name) => {
    const c = barRgb(name, amplitude)
    const p = rgbToYPbPr(c.r, c.g, c.b, matrix)
    const ce = compositeFromPbPr(p.pb, p.pr, matrix)
    return { name, u: ce.u, v: ce.v }
  })
}

export function resolveMatrix(m: string | undefined): MatrixName {
  if (m === undefined || m === '601') return '601'
  if (m === '709') return '709'
  throw new EngineInputError(`unknown matrix "${m}" (use 601 or 709)`)
}
