// Tolerances of the bars check and source matching, kept apart so the delivery-spec schema can
// hold them without importing the measurement.
import { z } from 'zod'

/**
 * Bars tolerances a delivery spec may hold (`barsTolerances`); absent, these common-practice
 * figures apply. None of them is from a published standard.
 */
export const BarsTolerancesSchema = z.object({
  /** Each bar's luma and the black level, ± IRE. */
  lumaIre: z.number().min(0).max(20),
  /** Chroma gain, ± % of the table. */
  chromaGainPct: z.number().min(0).max(50),
  /** Hue (phase) error of the bars as a whole and of each bar, ± degrees. */
  hueDeg: z.number().min(0).max(45),
  /**
   * Setup the delivery expects in the file's codes: `absent` (black at code 16, BT.601; an NTSC
   * encoder adds the 7.5 IRE), `present` (the pedestal carried in the codes, black near code 32), or `either`.
   */
  setup: z.enum(['present', 'absent', 'either']),
  /** Source matching against the reference: level offset ± IRE, luma gain ratio ± %, chroma ± %, hue ± °. */
  matchLevelIre: z.number().min(0).max(20),
  matchGainPct: z.number().min(0).max(50),
  matchChromaPct: z.number().min(0).max(50),
  matchHueDeg: z.number().min(0).max(45),
})
export type BarsTolerances = z.infer<typeof BarsTolerancesSchema>

export const DEFAULT_BARS_TOLERANCES: BarsTolerances = {
  lumaIre: 1, chromaGainPct: 3, hueDeg: 2, setup: 'absent',
  matchLevelIre: 1, matchGainPct: 2, matchChromaPct: 3, matchHueDeg: 2,
}
