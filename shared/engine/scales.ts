// Conversions between the engine's working unit — luma as an 8-bit-equivalent studio-range
// code, a float (16 = black, 235 = white) — and the scales a person reads.

export type LevelScale = 'ire' | 'ire0' | 'mv' | 'mvNtsc' | 'pct' | 'code8' | 'code10'

export const LEVEL_SCALES: readonly LevelScale[] = ['ire', 'ire0', 'mv', 'mvNtsc', 'pct', 'code8', 'code10']

export const BLACK_CODE8 = 16
export const WHITE_CODE8 = 235
export const LUMA_SPAN_CODE8 = WHITE_CODE8 - BLACK_CODE8

/** NTSC System M with setup: black at 7.5 IRE, white at 100 IRE (SMPTE 170M — memory). */
export const SETUP_IRE = 7.5
export const SETUP_SPAN_IRE = 100 - SETUP_IRE

/**
 * The `mv` scale follows the component analogue convention: black 0 mV, white 700 mV.
 * The `mvNtsc` scale follows NTSC composite with setup: 140 IRE = 1 V, so 1 IRE = 7.143 mV,
 * blanking 0 mV, black 53.6 mV, white 714.3 mV (SMPTE 170M, 1 IRE = 1/140 V — memory; computed).
 */
export const MV_CONVENTION = 'component: black 0 mV, white 700 mV' as const
export const MV_COMPONENT_WHITE = 700
export const MV_PER_IRE_NTSC = 1000 / 140

export const SCALE_UNITS: Record<LevelScale, string> = {
  ire: 'IRE',
  ire0: 'IRE',
  mv: 'mV',
  mvNtsc: 'mV',
  pct: '%',
  code8: '',
  code10: '',
}

/** Short names for column headings and the command line; SCALE_LABELS gives the long form. */
export const SCALE_SHORT: Record<LevelScale, string> = {
  ire: 'IRE',
  ire0: 'IRE, no setup',
  mv: 'mV',
  mvNtsc: 'mV NTSC',
  pct: '%',
  code8: '8-bit',
  code10: '10-bit',
}

/** The unit written after a spec's limit (the sheet, on screen and in the PDF). */
export const SCALE_LIMIT_UNITS: Record<LevelScale, string> = {
  ire: 'IRE',
  ire0: 'IRE (no setup)',
  mv: 'mV',
  mvNtsc: 'mV (NTSC)',
  pct: '%',
  code8: '(8-bit code)',
  code10: '(10-bit code)',
}

export const SCALE_LABELS: Record<LevelScale, string> = {
  ire: 'IRE (7.5 setup)',
  ire0: 'IRE (no setup)',
  mv: 'mV (component, 700 mV white)',
  mvNtsc: 'mV (NTSC, 714 mV white)',
  pct: '% of nominal range',
  code8: '8-bit code',
  code10: '10-bit code',
}

export function code8ToIre(code8: number): number {
  return SETUP_IRE + SETUP_SPAN_IRE * (code8 - BLACK_CODE8) / LUMA_SPAN_CODE8
}

export function ireToCode8(ire: number): number {
  return BLACK_CODE8 + (ire - SETUP_IRE) * LUMA_SPAN_CODE8 / SETUP_SPAN_IRE
}

/** A level on the nominal 0..1 scale (black..white), e.g. Y' or R'. */
export function code8ToUnit(code8: number): number {
  return (code8 - BLACK_CODE8) / LUMA_SPAN_CODE8
}

export function unitToCode8(unit: number): number {
  return BLACK_CODE8 + LUMA_SPAN_CODE8 * unit
}

export function toScale(code8: number, scale: LevelScale): number {
  switch (scale) {
    case 'ire': return code8ToIre(code8)
    case 'ire0': return 100 * code8ToUnit(code8)
    case 'pct': return 100 * code8ToUnit(code8)
    case 'mv': return MV_COMPONENT_WHITE * code8ToUnit(code8)
    case 'mvNtsc': return code8ToIre(code8) * MV_PER_IRE_NTSC
    case 'code8': return code8
    // 10-bit studio range is exactly the 8-bit range times four (64..940); only the rounding
    // of each depth differs, and these are unrounded levels.
    case 'code10': return code8 * 4
  }
}

export function fromScale(value: number, scale: LevelScale): number {
  switch (scale) {
    case 'ire': return ireToCode8(value)
    case 'ire0': return unitToCode8(value / 100)
    case 'pct': return unitToCode8(value / 100)
    case 'mv': return unitToCode8(value / MV_COMPONENT_WHITE)
    case 'mvNtsc': return ireToCode8(value / MV_PER_IRE_NTSC)
    case 'code8': return value
    case 'code10': return value / 4
  }
}

export function scaleDigits(scale: LevelScale): number {
  switch (scale) {
    case 'ire': case 'ire0': case 'pct': return 1
    case 'mv': case 'mvNtsc': return 0
    case 'code8': case 'code10': return 0
  }
}

export function formatLevel(code8: number, scale: LevelScale, digits = scaleDigits(scale)): string {
  const v = toScale(code8, scale)
  const unit = SCALE_UNITS[scale]
  const text = (Object.is(v, -0) ? 0 : v).toFixed(digits)
  return unit ? `${text} ${unit}` : text
}

export function formatShare(share: number): string {
  if (share === 0) return '0 %'
  const pct = share * 100
  return `${pct < 0.01 ? pct.toExponential(1) : pct < 1 ? pct.toFixed(3) : pct.toFixed(2)} %`
}
