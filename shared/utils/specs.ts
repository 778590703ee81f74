// Delivery specs as the team edits them: unit conversion of a limit, what changed between two
// versions, and judging a stored analysis again from its level distributions (no pixels).
import { z } from 'zod'
// Engine modules by file, not the index: the browser bundle then holds the verdict, not the measuring kernels.
import { fromScale, SCALE_LABELS, toScale, type LevelScale } from '../engine/scales'
import { DeliverySpecSchema, type DeliverySpec, type SpecLimit, type SpecQuantity } from '../engine/specs'
import { evaluateSpec, type Measured } from '../engine/verdict'
import { unpackLevels, type PackedLevels } from '../engine/pack'
import type { Verdict, VerdictReason } from '../engine/types'

export const QUANTITY_LABELS: Record<SpecQuantity, string> = {
  luma: 'Luma (Y\')',
  composite: 'Composite envelope (Y\' ± chroma)',
  rgb: 'R\'G\'B\' gamut (each channel)',
  cb: 'Chroma Cb (codes)',
  cr: 'Chroma Cr (codes)',
}

export const UNIT_LABELS = SCALE_LABELS

/** The units a quantity can be given in: Cb and Cr have codes only (specs.ts). */
export function unitsFor(q: SpecQuantity): LevelScale[] {
  return q === 'cb' || q === 'cr' ? ['code8', 'code10'] : ['ire', 'ire0', 'mv', 'mvNtsc', 'pct', 'code8', 'code10']
}

// Six decimals remove the float noise of a conversion (e.g. 7.500000000000001) and keep far more
// precision than any scale shows; the levels the standards name convert exactly either way.
const tidy = (v: number) => Math.round(v * 1e6) / 1e6 + 0

export function convertLevel(value: number, from: LevelScale, to: LevelScale): number {
  return tidy(toScale(fromScale(value, from), to))
}

/**
 * The same limit in another unit: the threshold and the caution point are converted as levels
 * (through the engine's 8-bit-equivalent code), the margin is their difference. The engine
 * judges on that code whichever unit the person picked, so the verdict does not change.
 */
export function convertLimitUnit(l: SpecLimit, to: LevelScale): SpecLimit {
  if (l.unit === to) return l
  const inward = l.bound === 'max' ? -l.warningMargin : l.warningMargin
  const value = convertLevel(l.value, l.unit, to)
  const caution = convertLevel(l.value + inward, l.unit, to)
  return { ...l, unit: to, value, warningMargin: tidy(Math.abs(caution - value)) }
}

/** What changed from one version to the next, in words for the history. */
export function describeSpecChanges(before: DeliverySpec, after: DeliverySpec): string[] {
  const out: string[] = []
  if (before.title !== after.title) out.push(`title “${before.title}” → “${after.title}”`)
  if (before.description !== after.description) out.push('description edited')
  const fmt = (l: SpecLimit) => `${l.value} ${UNIT_LABELS[l.unit]}, caution margin ${l.warningMargin}, area tolerance ${+(l.areaTolerance * 100).toFixed(4)} %${l.filter === 'lowpass' ? ', low-pass' : ''}${l.minRegion === '3x3' ? ', 3×3 regions' : ''}`
  const old = new Map(before.limits.map((l) => [l.id, l]))
  for (const l of after.limits) {
    const o = old.get(l.id)
    if (!o) out.push(`added ${l.label} (${fmt(l)})`)
    else {
      if (JSON.stringify({ ...o, label: '' }) !== JSON.stringify({ ...l, label: '' })) out.push(`${l.label}: ${fmt(o)} → ${fmt(l)}`)
      else if (o.label !== l.label) out.push(`renamed “${o.label}” → “${l.label}”`)
      old.delete(l.id)
    }
  }
  for (const l of old.values()) out.push(`removed ${l.label}`)
  return out
}

/** What the worker stores with an analysis that re-judging needs (analyses.result, .histograms, .levels). */
export interface StoredMeasurement {
  result: Pick<Measured, 'width' | 'height' | 'luma' | 'compositeIre' | 'chroma'>
  histograms: { bins: number, cb: ArrayLike<number>, cr: ArrayLike<number> }
  levels: PackedLevels
}

export function measuredFromStored(s: StoredMeasurement): Measured {
  const lv = unpackLevels(s.levels)
  const h = s.histograms
  const none = new Uint32Array(0)
  // Cb and Cr are converted only when a limit reads them (most specs judge luma and gamut alone).
  let cb: Uint32Array | undefined
  let cr: Uint32Array | undefined
  return {
    width: s.result.width, height: s.result.height,
    luma: s.result.luma, compositeIre: s.result.compositeIre, chroma: s.result.chroma,
    histograms: {
      bins: h.bins, y: none,
      get cb() { return (cb ??= Uint32Array.from(h.cb)) },
      get cr() { return (cr ??= Uint32Array.from(h.cr)) },
      rgbCoding: 'studio', r: none, g: none, b: none, levels: lv,
    },
  }
}

export function judgeStored(s: StoredMeasurement, spec: DeliverySpec): { verdict: Verdict, reasons: VerdictReason[] } {
  return evaluateSpec(measuredFromStored(s), spec)
}

export interface VerdictChange { frameId: number, from: Verdict, to: Verdict }

/** "14 frames change verdict: 9 pass → fail, 5 fail → caution" */
export function summariseChanges(changes: Array<Pick<VerdictChange, 'from' | 'to'>>): { text: string, transitions: Array<{ from: Verdict, to: Verdict, count: number }> } {
  const counts = new Map<string, number>()
  for (const c of changes) counts.set(`${c.from}→${c.to}`, (counts.get(`${c.from}→${c.to}`) ?? 0) + 1)
  const transitions = [...counts.entries()].map(([k, count]) => {
    const [from, to] = k.split('→') as [Verdict, Verdict]
    return { from, to, count }
  }).sort((a, b) => b.count - a.count || `${a.from}${a.to}`.localeCompare(`${b.from}${b.to}`))
  if (!changes.length) return { text: 'No frame changes verdict', transitions }
  const n = changes.length
  return { text: `${n} frame${n === 1 ? '' : 's'} change${n === 1 ? 's' : ''} verdict: ${transitions.map((t) => `${t.count} ${t.from} → ${t.to}`).join(', ')}`, transitions }
}

// Bodies of the spec routes, shared with the forms.
export const SpecCreateBody = z.object({ spec: DeliverySpecSchema })
export const SpecVersionBody = z.object({
  spec: DeliverySpecSchema,
  /** The version the edit started from: a save on top of someone else's newer version is refused. */
  baseVersion: z.number().int().positive(),
  /** true: answer what re-judging would change, save nothing. */
  preview: z.boolean().default(false),
})
export const ProductionSpecBody = z.object({
  specId: z.number().int().positive(),
  preview: z.boolean().default(false),
})
