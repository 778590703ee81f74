// The per-pixel accumulators shared by the reference pass (analyse.ts) and the fast kernels
// (fast.ts), with the constants both must use so that they bin every level the same way.
import { LEVEL_MIN, LEVEL_STEP } from './levels'
import { ireToCode8 } from './scales'
import { VECTORSCOPE_EXTENT, VECTORSCOPE_SIZE } from './vectorscope'
import type { LevelDistributions } from './types'
import type { MaskLimits } from './mask'

/** Composite limits behind shares.compositeOut: −20…+120 IRE (+120: ITU-R BT.1700 peak level; −20: NTSC broadcast practice, no standard found). */
export const COMPOSITE_OUT_LOW_IRE = -20
export const COMPOSITE_OUT_HIGH_IRE = 120

// Studio-range test on the same quarter-code grid as the level distributions, so that
// shares.studioOut agrees with what a spec on those distributions would count.
export const LOW_BAND = 16 - LEVEL_STEP / 2
export const HIGH_LUMA = 235 + LEVEL_STEP / 2
export const HIGH_CHROMA = 240 + LEVEL_STEP / 2

// The level-bin index of a code: centred quarter-code bins from LEVEL_MIN. The span of
// LEVEL_MIN.. is wide enough for every level any accepted input can produce (levels.ts), so
// no clamp is needed; a typed-array store out of range would be dropped, never written.
export const LV_OFF = -LEVEL_MIN / LEVEL_STEP + 0.5
export const LV_SCALE = 1 / LEVEL_STEP
export const COMP_HI = ireToCode8(COMPOSITE_OUT_HIGH_IRE)
export const COMP_LO = ireToCode8(COMPOSITE_OUT_LOW_IRE)
export const VS_SCALE = VECTORSCOPE_SIZE / (2 * VECTORSCOPE_EXTENT)
export const VS_LAST = VECTORSCOPE_SIZE - 1

export interface Totals {
  sumY: number
  yMin: number
  yMax: number
  cbMin: number
  cbMax: number
  crMin: number
  crMax: number
  compMin: number
  compMax: number
  cMax: number
  compositeOut: number
  gamutOut: number
  studioOut: number
}

export interface Densities {
  columns: number
  decimation: number
  colOf: Int32Array
  /** Level-bin index → row offset (row · columns) in the waveform densities. */
  rowOff: Int32Array
  luma: Uint32Array
  flat: Uint32Array
  r: Uint32Array
  g: Uint32Array
  b: Uint32Array
  vector: Uint32Array
  /** The range mask (mask.ts), its column of each frame column, offset of each frame row's mask row, and limits. */
  mask: Uint8Array
  maskCol: Int32Array
  maskRow: Int32Array
  lim: MaskLimits
}

export interface Coef { uK: number, vK: number, rK: number, bK: number, gR: number, gB: number, cbOff: number, hs: number, gamHi: number, gamLo: number }

export interface Accumulators {
  coef: Coef
  cbHist: Uint32Array
  crHist: Uint32Array
  levels: LevelDistributions
  t: Totals
  dens: Densities | undefined
}
