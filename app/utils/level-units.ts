// Level figures are stored in IRE with 7.5 setup; the frames table shows them in whichever
// scale the reader chose (the units store, shared with the frame page), through the engine's
// own conversions so that every screen agrees to the last digit.
import { formatShare, ireToCode8, scaleDigits, toScale, type LevelScale } from '../../shared/engine/scales'

export { SCALE_SHORT } from '../../shared/engine/scales'

/** A stored IRE (7.5 setup) level on another scale. */
export function ireToScale(ire: number, scale: LevelScale): number {
  return toScale(ireToCode8(ire), scale)
}

export type CompositeScale = 'ire' | 'ire0' | 'pct' | 'mvNtsc'

/**
 * Composite (luma ± chroma amplitude) is an analogue quantity: it reaches +130 IRE on bars,
 * where no digital code exists, and component millivolts carry no chroma on luma. So the
 * composite column stays in IRE with setup for codes and component mV, and follows the
 * switch only on the scales that are IRE rescaled (no setup, percent, NTSC millivolts).
 */
export function compositeScale(scale: LevelScale): CompositeScale {
  return scale === 'ire0' || scale === 'pct' || scale === 'mvNtsc' ? scale : 'ire'
}

/** A number for a table cell: fixed digits per scale, never "-0.0", a dash for "not measured". */
export function formatIreAs(ire: number | null | undefined, scale: LevelScale): string {
  if (ire === null || ire === undefined || !Number.isFinite(ire)) return '—'
  const digits = scaleDigits(scale)
  const text = ireToScale(ire, scale).toFixed(digits)
  return Number(text) === 0 ? (0).toFixed(digits) : text
}

export function formatOutShare(share: number | null | undefined): string {
  if (share === null || share === undefined || !Number.isFinite(share)) return '—'
  return formatShare(share)
}
