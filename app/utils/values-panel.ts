// What the values panel shows, in the scale a person picked. Pure functions so the unit
// conversions are tested without a browser (tests/unit/app/values-panel.test.ts).
import { formatLevel, formatShare, ireToCode8, toScale, type LevelScale } from '../../shared/engine/scales'
import type { LumaStats, Shares } from '../../shared/engine/types'
import { builtinSpec } from '../../shared/engine/specs'

export interface ValueRow {
  key: string
  label: string
  /** The figure in the chosen scale, unrounded. */
  value: number
  /** Rounded, with its unit. */
  text: string
}

const LUMA_ROWS: Array<[keyof LumaStats, string]> = [
  ['min', 'Min (black level)'], ['p1', '1st percentile'], ['p10', '10th percentile'], ['p50', 'Median'],
  ['mean', 'Mean'], ['p90', '90th percentile'], ['p99', '99th percentile'], ['max', 'Max (peak white)'],
]

/** Luma statistics, given as 8-bit-equivalent codes, in the chosen scale. */
export function lumaValueRows(luma: LumaStats, scale: LevelScale): ValueRow[] {
  return LUMA_ROWS.map(([key, label]) => ({ key, label, value: toScale(luma[key], scale), text: formatLevel(luma[key], scale) }))
}

/**
 * Composite extremes arrive in IRE on the setup scale (the composite equivalent has no code of
 * its own); taken through the luma code they read on every other scale like a luma level.
 */
export function compositeValueRows(compositeIre: { min: number, max: number }, scale: LevelScale): ValueRow[] {
  return ([['min', 'Composite min'], ['max', 'Composite max']] as const).map(([key, label]) => {
    const code8 = ireToCode8(compositeIre[key])
    return { key: `composite-${key}`, label, value: toScale(code8, scale), text: formatLevel(code8, scale) }
  })
}

/** Cb and Cr extremes: codes only (they have no IRE or mV meaning), at 10 bits when that scale is chosen. */
export function chromaCodeRows(chroma: { cbMin: number, cbMax: number, crMin: number, crMax: number }, scale: LevelScale): ValueRow[] {
  const tenBit = scale === 'code10'
  const rows: Array<[keyof typeof chroma, string]> = [['cbMin', 'Cb min'], ['cbMax', 'Cb max'], ['crMin', 'Cr min'], ['crMax', 'Cr max']]
  return rows.map(([key, label]) => {
    const value = tenBit ? chroma[key] * 4 : chroma[key]
    return { key, label, value, text: `${value.toFixed(0)}` }
  })
}

/** Chroma peak-to-peak stays in IRE: it is a composite amplitude, read off the setup scale. */
export function chromaPpText(ppMaxIre: number): string {
  return `${ppMaxIre.toFixed(1)} IRE`
}

const SHARE_LABELS: Record<keyof Shares, string> = {
  belowBlack: 'Below black',
  aboveWhite: 'Above white',
  compositeOut: 'Composite beyond limits',
  gamutOut: 'Outside RGB gamut',
  clipped: 'Clipped at the top code',
  crushed: 'Crushed at the bottom code',
  studioOut: 'Outside studio range',
}

export function shareRows(shares: Shares): ValueRow[] {
  return (Object.keys(SHARE_LABELS) as Array<keyof Shares>).map((key) => ({
    key, label: SHARE_LABELS[key], value: shares[key] * 100, text: formatShare(shares[key]),
  }))
}

/** A level difference (b − a) already in the chosen scale, signed, with the scale's unit. */
export function formatDifference(diff: number, scale: LevelScale): string {
  const digits = scale === 'ire' || scale === 'ire0' || scale === 'pct' ? 1 : 0
  const rounded = Number(diff.toFixed(digits))
  const text = `${rounded > 0 ? '+' : rounded < 0 ? '−' : '±'}${Math.abs(rounded).toFixed(digits)}`
  const unit = scale === 'ire' || scale === 'ire0' ? 'IRE' : scale === 'pct' ? '%' : scale === 'mv' || scale === 'mvNtsc' ? 'mV' : scale === 'code10' ? 'codes (10-bit)' : 'codes'
  return `${text} ${unit}`
}

/** The readable title of a spec the analysis names (built-in specs keep their name in team copies). */
export function specTitle(name: string): string {
  return builtinSpec(name)?.title ?? name
}
