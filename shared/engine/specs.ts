import { z } from 'zod'
import { BarsTolerancesSchema } from './bars-tolerances'

export const SPEC_QUANTITIES = ['luma', 'composite', 'rgb', 'cb', 'cr'] as const
export type SpecQuantity = typeof SPEC_QUANTITIES[number]

export const SPEC_UNITS = ['ire', 'ire0', 'mv', 'mvNtsc', 'pct', 'code8', 'code10'] as const

export const SpecLimitSchema = z.object({
  /** Stable key, reported as `limit` in a verdict reason. */
  id: z.string().trim().min(1).max(64).regex(/^[a-z0-9][a-z0-9-]*$/, 'lower-case letters, digits and dashes'),
  label: z.string().trim().min(1).max(120),
  /** luma: Y'; composite: Y' ± chroma amplitude; rgb: each of R', G', B'; cb/cr: the colour-difference codes. */
  quantity: z.enum(SPEC_QUANTITIES),
  /** `max`: nothing may stand above `value`; `min`: nothing may stand below it. */
  bound: z.enum(['min', 'max']),
  value: z.number(),
  unit: z.enum(SPEC_UNITS),
  /**
   * Distance inside the limit, in the same unit, where a caution starts: levels between
   * (value − margin) and value for a `max` bound make the frame `caution`, beyond value `fail`.
   */
  warningMargin: z.number().min(0, 'the caution point must lie inside the limit (a margin of 0 or more)'),
  /** Share of the picture (0..1) that may stand beyond the threshold before it counts. */
  areaTolerance: z.number().min(0, 'the area tolerance is a share from 0 to 1').max(1, 'the area tolerance is a share from 0 to 1'),
  /**
   * `lowpass`: judge R'G'B' after the spatial low-pass filter of lowpass.ts, so that the
   * overshoots of sharp edges do not count (EBU R 103 measurement practice). Gamut limits only.
   */
  filter: z.enum(['none', 'lowpass']).optional(),
  /**
   * `3x3`: a pixel counts beyond the limit only when the whole 3×3 block around it is beyond, so
   * a single hot pixel or a thin line is ignored where the client allows. Luma, composite and gamut.
   */
  minRegion: z.enum(['pixel', '3x3']).optional(),
})

export type SpecLimit = z.infer<typeof SpecLimitSchema>

export const DeliverySpecSchema = z.object({
  name: z.string().trim().min(1).max(64),
  title: z.string().trim().min(1).max(120),
  description: z.string().max(4000),
  limits: z.array(SpecLimitSchema).min(1).max(32),
  /** Bars check and source-matching tolerances; common practice (bars.ts) when absent. */
  barsTolerances: BarsTolerancesSchema.optional(),
}).superRefine((spec, ctx) => {
  const seen = new Set<string>()
  spec.limits.forEach((l, i) => {
    if (seen.has(l.id)) ctx.addIssue({ code: 'custom', path: ['limits', i, 'id'], message: `duplicate limit id "${l.id}"` })
    seen.add(l.id)
    // Cb and Cr have no IRE, mV or percent meaning of their own: only codes are accepted.
    if ((l.quantity === 'cb' || l.quantity === 'cr') && l.unit !== 'code8' && l.unit !== 'code10') {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'unit'], message: 'Cb and Cr limits are given in 8-bit or 10-bit codes' })
    }
    if (l.filter === 'lowpass' && l.quantity !== 'rgb') {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'filter'], message: 'the low-pass filter applies to R\'G\'B\' gamut limits only' })
    }
    if (l.minRegion === '3x3' && (l.quantity === 'cb' || l.quantity === 'cr')) {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'minRegion'], message: 'a minimum region applies to luma, composite and R\'G\'B\' limits' })
    }
    if (l.minRegion === '3x3' && l.filter === 'lowpass') {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'minRegion'], message: 'choose either the low-pass filter or a minimum region for one limit, not both' })
    }
    if (!Number.isFinite(l.value) || Math.abs(l.value) > 10000) {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'value'], message: 'enter a threshold between −10000 and 10000' })
    }
    if (l.warningMargin > 1000) {
      ctx.addIssue({ code: 'custom', path: ['limits', i, 'warningMargin'], message: 'the caution margin is at most 1000 in the limit\'s unit' })
    }
  })
})

export type DeliverySpec = z.infer<typeof DeliverySpecSchema>

const NTSC_SETUP: DeliverySpec = {
  name: 'ntsc-setup',
  title: 'NTSC broadcast with setup',
  description: [
    'Luma 7.5–100 IRE and composite −20…+120 IRE on the NTSC System M scale with 7.5 IRE setup.',
    // Printed on the producer's sheet, so it names the standards plainly. For the record: the
    // SMPTE 170M clause for setup and white is recalled from memory, and no published standard
    // was found for the −20 IRE lower composite limit (tests/unit/engine/specs.test.ts says so).
    'Sources: black (setup) 7.5 IRE and white 100 IRE — SMPTE 170M;',
    '+120 IRE composite peak — ITU-R BT.1700 peak level.',
    'Common practice (no published standard): the −20 IRE lower composite limit, the warning margins and the zero area tolerance.',
  ].join(' '),
  limits: [
    { id: 'luma-min', label: 'Luma below setup', quantity: 'luma', bound: 'min', value: 7.5, unit: 'ire', warningMargin: 0, areaTolerance: 0 },
    { id: 'luma-max', label: 'Luma above white', quantity: 'luma', bound: 'max', value: 100, unit: 'ire', warningMargin: 0, areaTolerance: 0 },
    { id: 'composite-min', label: 'Composite below −20 IRE', quantity: 'composite', bound: 'min', value: -20, unit: 'ire', warningMargin: 3, areaTolerance: 0 },
    { id: 'composite-max', label: 'Composite above +120 IRE', quantity: 'composite', bound: 'max', value: 120, unit: 'ire', warningMargin: 5, areaTolerance: 0 },
  ],
}

const DIGITAL_STUDIO: DeliverySpec = {
  name: 'digital-studio',
  title: 'Digital studio range',
  description: [
    'Luma within codes 16–235 and Cb/Cr within 16–240 (8-bit; 64–940 and 64–960 at 10 bits).',
    'Source: ITU-R BT.601-7 Table 3 and ITU-R BT.709-6 Part 2 (quantisation levels).',
    'Zero margin and zero area tolerance: any code outside the range counts.',
  ].join(' '),
  limits: [
    { id: 'luma-min', label: 'Luma below code 16', quantity: 'luma', bound: 'min', value: 16, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
    { id: 'luma-max', label: 'Luma above code 235', quantity: 'luma', bound: 'max', value: 235, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
    { id: 'cb-min', label: 'Cb below code 16', quantity: 'cb', bound: 'min', value: 16, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
    { id: 'cb-max', label: 'Cb above code 240', quantity: 'cb', bound: 'max', value: 240, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
    { id: 'cr-min', label: 'Cr below code 16', quantity: 'cr', bound: 'min', value: 16, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
    { id: 'cr-max', label: 'Cr above code 240', quantity: 'cr', bound: 'max', value: 240, unit: 'code8', warningMargin: 0, areaTolerance: 0 },
  ],
}

// The Annex 1 clause number and the absence of fixed filter coefficients in R 103 are recalled
// from memory (see lowpass.ts); the user-facing description states only what the spec does.
const EBU_TOLERANCE: DeliverySpec = {
  name: 'ebu-r103-v3',
  title: 'European tolerance (EBU R 103 v3.0)',
  description: [
    'Luma and each of R\', G\', B\' within −5 %…105 % of the nominal range (8-bit codes 5–246, 10-bit 20–984),',
    'with excursions tolerated over up to 1 % of the picture area.',
    'Source: EBU R 103 v3.0 (2020), which supersedes the v1 figures (luma −1 %…103 %).',
    'The warning margins put the caution threshold at the v1 luma figures (−1 %, 103 %) and 1 % inside the RGB limits — our choice.',
    'Measurement practice (R 103 v3.0): R\'G\'B\' is judged after spatial low-pass filtering, so that the overshoots of sharp edges',
    'and single-pixel excursions are not counted as gamut errors, and up to 1 % of the picture area may stand outside.',
    'The filter is ours: a 3×3 binomial kernel. Luma is judged unfiltered.',
  ].join(' '),
  limits: [
    { id: 'luma-min', label: 'Luma below −5 %', quantity: 'luma', bound: 'min', value: -5, unit: 'pct', warningMargin: 4, areaTolerance: 0.01 },
    { id: 'luma-max', label: 'Luma above 105 %', quantity: 'luma', bound: 'max', value: 105, unit: 'pct', warningMargin: 2, areaTolerance: 0.01 },
    { id: 'rgb-min', label: 'R\'G\'B\' below −5 %', quantity: 'rgb', bound: 'min', value: -5, unit: 'pct', warningMargin: 1, areaTolerance: 0.01, filter: 'lowpass' },
    { id: 'rgb-max', label: 'R\'G\'B\' above 105 %', quantity: 'rgb', bound: 'max', value: 105, unit: 'pct', warningMargin: 1, areaTolerance: 0.01, filter: 'lowpass' },
  ],
}

export const BUILTIN_SPECS: readonly DeliverySpec[] = [NTSC_SETUP, DIGITAL_STUDIO, EBU_TOLERANCE]

export const DEFAULT_SPEC_NAME = 'ntsc-setup'

export function builtinSpec(name: string): DeliverySpec | undefined {
  return BUILTIN_SPECS.find(s => s.name === name)
}
