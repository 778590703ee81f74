import { formatShare, fromScale, ireToCode8, SCALE_UNITS, toScale } from './scales'
import type { LevelScale } from './scales'
import type { DeliverySpec, SpecLimit } from './specs'
import type { FrameAnalysis, Verdict, VerdictReason } from './types'
import { shareAbove, shareBelow } from './levels'

export type Measured = Pick<FrameAnalysis, 'width' | 'height' | 'histograms' | 'luma' | 'compositeIre' | 'chroma'>

interface Dist { data: Uint32Array, min: number, step: number }

function distFor(a: Measured, l: SpecLimit): Dist {
  const lv = a.histograms.levels
  const level = (data: Uint32Array): Dist => ({ data, min: lv.min, step: lv.step })
  const coarse = (data: Uint32Array): Dist => ({ data, min: 0, step: 256 / a.histograms.bins })
  // Spatial distributions are absent from analyses stored before they were measured: those are
  // judged per pixel, which is stricter.
  const r3 = l.minRegion === '3x3'
  switch (l.quantity) {
    case 'luma': return level((r3 ? (l.bound === 'max' ? lv.lumaMaxR3 : lv.lumaMinR3) : undefined) ?? lv.luma)
    case 'composite': return level((r3 ? (l.bound === 'max' ? lv.compMaxR3 : lv.compMinR3) : undefined) ?? (l.bound === 'max' ? lv.compMax : lv.compMin))
    case 'rgb': {
      const lp = l.filter === 'lowpass' ? (l.bound === 'max' ? lv.rgbMaxLp : lv.rgbMinLp) : undefined
      const rr = r3 ? (l.bound === 'max' ? lv.rgbMaxR3 : lv.rgbMinR3) : undefined
      return level(lp ?? rr ?? (l.bound === 'max' ? lv.rgbMax : lv.rgbMin))
    }
    case 'cb': return coarse(a.histograms.cb)
    case 'cr': return coarse(a.histograms.cr)
  }
}

/** The limit's value, or a level relative to it, as an 8-bit-equivalent code. */
function toCode8(value: number, l: SpecLimit): number {
  return fromScale(value, l.unit as LevelScale)
}

function fromCode8(code8: number, l: SpecLimit): number {
  return toScale(code8, l.unit as LevelScale)
}

function extreme(a: Measured, l: SpecLimit, d: Dist): number {
  const max = l.bound === 'max'
  switch (l.quantity) {
    case 'luma': return max ? a.luma.max : a.luma.min
    case 'composite': return ireToCode8(max ? a.compositeIre.max : a.compositeIre.min)
    case 'cb': return max ? a.chroma.cbMax : a.chroma.cbMin
    case 'cr': return max ? a.chroma.crMax : a.chroma.crMin
    case 'rgb': {
      if (max) {
        for (let i = d.data.length - 1; i >= 0; i--) if (d.data[i]) return d.min + i * d.step
      }
      else {
        for (let i = 0; i < d.data.length; i++) if (d.data[i]) return d.min + i * d.step
      }
      return NaN
    }
  }
}

function fmt(v: number, l: SpecLimit): string {
  const unit = SCALE_UNITS[l.unit as LevelScale]
  const digits = l.unit === 'code8' || l.unit === 'code10' || l.unit === 'mv' || l.unit === 'mvNtsc' ? 0 : 1
  const text = v.toFixed(digits)
  return unit ? `${text} ${unit}` : `code ${text}`
}

export interface SpecEvaluation {
  verdict: Verdict
  reasons: VerdictReason[]
}

/**
 * A limit fails when the share of the picture beyond its value exceeds the area tolerance,
 * and raises a caution when the share beyond (value − warning margin, inward) does. Every
 * limit that is not clean gives a reason.
 */
export function evaluateSpec(a: Measured, spec: DeliverySpec): SpecEvaluation {
  const n = a.width * a.height
  const reasons: VerdictReason[] = []
  for (const l of spec.limits) {
    const d = distFor(a, l)
    const inward = l.bound === 'max' ? -l.warningMargin : l.warningMargin
    const t = toCode8(l.value, l)
    const w = toCode8(l.value + inward, l)
    const beyond = (th: number) => l.bound === 'max'
      ? shareAbove(d.data, d.min, d.step, th, n)
      : shareBelow(d.data, d.min, d.step, th, n)
    const failShare = beyond(t)
    const warnShare = l.warningMargin > 0 ? beyond(w) : failShare
    const severity = failShare > l.areaTolerance ? 'fail' : warnShare > l.areaTolerance ? 'caution' : undefined
    if (!severity) continue
    const share = severity === 'fail' ? failShare : warnShare
    const threshold = severity === 'fail' ? l.value : l.value + inward
    const value = fromCode8(extreme(a, l, d), l)
    const side = l.bound === 'max' ? 'above' : 'below'
    const how = l.filter === 'lowpass' ? ' (after low-pass)' : l.minRegion === '3x3' ? ' (3×3-pixel regions)' : ''
    const message = `${l.label}${how}: ${l.bound === 'max' ? 'peaks at' : 'reaches'} ${fmt(value, l)}; `
      + `${formatShare(share)} of the picture is ${side} ${fmt(threshold, l)}`
      + `${severity === 'caution' ? ` (caution band; limit ${fmt(l.value, l)})` : ''}`
      + `, tolerance ${formatShare(l.areaTolerance)}`
    reasons.push({ limit: l.id, value, share, severity, unit: l.unit, threshold, message })
  }
  const verdict: Verdict = reasons.some(r => r.severity === 'fail') ? 'fail' : reasons.length ? 'caution' : 'pass'
  return { verdict, reasons }
}
