// Shapes of the line-up JSON (bars check, blanking, source matching) as the routes send it.
import type { BarsJson, BlankingJson, MatchJson, MatchReference } from '../../shared/utils/lineup'
import type { BarsTolerances } from '../../shared/engine'
import type { Role } from '../../shared/utils/roles'

export type { BarsJson, BlankingJson, MatchJson, MatchReference }

export interface MatchingSource {
  reelId: number
  reelName: string
  sourceLabel: string
  frameId: number
  frameName: string
  verdict: 'pass' | 'caution' | 'fail'
  bars: BarsJson
  match: MatchJson | null
}

export interface MatchingResponse {
  role: Role
  reference: { ref: MatchReference, bars: BarsJson } | null
  sources: MatchingSource[]
  tolerances: BarsTolerances
  toleranceSource: string
  spec: string
}

const sign = (v: number, d: number) => `${v >= 0 ? '+' : '−'}${Math.abs(v).toFixed(d)}`
export const signed = sign

/** A bar's table point on the vectorscope, from its table chroma (p-p IRE on the setup scale) and phase. */
export function tablePoint(ppIre: number, phaseDeg: number | null): { u: number, v: number } | null {
  if (phaseDeg === null || ppIre <= 0) return null
  const c = ppIre / 185
  return { u: c * Math.cos(phaseDeg * Math.PI / 180), v: c * Math.sin(phaseDeg * Math.PI / 180) }
}

/** The row in the middle of the bars' sampled regions: where both sources' line plots are read. */
export function barsLine(b: BarsJson): number | null {
  const r = b.bars[0]?.region
  return r ? Math.round((r.y0 + r.y1) / 2) : null
}
