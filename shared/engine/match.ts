// Source matching: one source's bars against the production's reference source. Each figure
// is the difference of the two sources' own bars figures, so both are read the same way.
import type { BarsResult, BarsTolerances } from './bars'

export interface MatchReason { check: 'level' | 'gain' | 'chroma' | 'hue', value: number, tolerance: number, unit: string, message: string }

export interface MatchResult {
  /** Black level of the source minus the reference's (IRE, 92.5 IRE per 219 codes). */
  levelOffsetIre: number
  /** Luma gain of the source over the reference's (1 = equal). */
  gainRatio: number
  /** Chroma gain of the source against the reference's, in % (0 = equal). */
  chromaGainPct: number
  /** Hue of the source minus the reference's (degrees, −180…180). */
  hueOffsetDeg: number
  verdict: 'pass' | 'fail'
  reasons: MatchReason[]
  /** "+2.1 IRE, gain ×1.000, chroma −4 %, hue +3.0°". */
  summary: string
}

type BarsFigures = Pick<BarsResult, 'recognised' | 'blackCode8' | 'lumaGainPct' | 'chromaGainPct' | 'hueErrorDeg'>

const signed = (v: number, d: number) => `${v >= 0 ? '+' : '−'}${Math.abs(v).toFixed(d)}`

/** Null when either frame was not recognised as bars. */
export function matchBars(reference: BarsFigures, source: BarsFigures, tol: BarsTolerances): MatchResult | null {
  if (!reference.recognised || !source.recognised) return null
  // Black levels compared as codes, on the setup scale's 92.5 IRE per 219 codes, so sources read on
  // different scales (one carrying setup in its codes) still compare.
  const levelOffsetIre = (source.blackCode8! - reference.blackCode8!) * 92.5 / 219
  const gainRatio = source.lumaGainPct! / reference.lumaGainPct!
  const chromaGainPct = 100 * (source.chromaGainPct! / reference.chromaGainPct! - 1)
  const hueOffsetDeg = ((source.hueErrorDeg! - reference.hueErrorDeg! + 540) % 360) - 180
  const reasons: MatchReason[] = []
  if (Math.abs(levelOffsetIre) > tol.matchLevelIre) reasons.push({ check: 'level', value: levelOffsetIre, tolerance: tol.matchLevelIre, unit: 'IRE', message: `Level ${signed(levelOffsetIre, 1)} IRE against the reference (±${tol.matchLevelIre} IRE)` })
  const gainPct = 100 * (gainRatio - 1)
  if (Math.abs(gainPct) > tol.matchGainPct) reasons.push({ check: 'gain', value: gainPct, tolerance: tol.matchGainPct, unit: '%', message: `Luma gain ${signed(gainPct, 1)} % against the reference (±${tol.matchGainPct} %)` })
  if (Math.abs(chromaGainPct) > tol.matchChromaPct) reasons.push({ check: 'chroma', value: chromaGainPct, tolerance: tol.matchChromaPct, unit: '%', message: `Chroma ${signed(chromaGainPct, 1)} % against the reference (±${tol.matchChromaPct} %)` })
  if (Math.abs(hueOffsetDeg) > tol.matchHueDeg) reasons.push({ check: 'hue', value: hueOffsetDeg, tolerance: tol.matchHueDeg, unit: '°', message: `Hue ${signed(hueOffsetDeg, 1)}° against the reference (±${tol.matchHueDeg}°)` })
  return {
    levelOffsetIre, gainRatio, chromaGainPct, hueOffsetDeg,
    verdict: reasons.length ? 'fail' : 'pass', reasons,
    summary: `${signed(levelOffsetIre, 1)} IRE, gain ×${gainRatio.toFixed(3)}, chroma ${signed(chromaGainPct, 0)} %, hue ${signed(hueOffsetDeg, 1)}°`,
  }
}
