// A summary of the levels (AnalyseOptions.levels 'spec': the composite and R'G'B' levels
// counted only against the thresholds one spec reads, what a clip's timeline asks for)
// against the whole distributions: for any planar 4:2:2 frame and any spec, the verdict, every
// reason (value, share, message), every statistic and share, the timeline row a clip stores
// and the extreme R'G'B' bins must be the same. The reference is the same engine counting
// whole distributions, which fast.test.ts holds to the plain per-pixel pass.
// (Checked to fail: one pixel of a second threshold counted with > instead of ≥ — caught by
// the threshold counts, not by the verdicts — and the extreme of rgbMin kept as a max.)
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec } from '../../../shared/engine/index'
import type { DeliverySpec, FrameAnalysis, FrameInput } from '../../../shared/engine/index'
import type { SpecLimit } from '../../../shared/engine/specs'
import { thresholdBins } from '../../../shared/engine/verdict'
import { fastTuning } from '../../../shared/engine/fast/index'
import { emptyTimeline, recordFrame } from '../../../shared/utils/clip-timeline'
import { frameOf } from './frames'

const UNITS = ['ire', 'ire0', 'mv', 'mvNtsc', 'pct', 'code8', 'code10'] as const

/** A limit on any per-pixel quantity; values are drawn on the quarter-code grid and near it, so bin edges are met. */
const limit = fc.record({
  quantity: fc.constantFrom('luma', 'composite', 'composite', 'rgb', 'rgb', 'cb', 'cr'),
  bound: fc.constantFrom('min', 'max'),
  code8: fc.oneof(fc.integer({ min: -100 * 4, max: 330 * 4 }).map(q => q / 4), fc.double({ min: -100, max: 330, noNaN: true })),
  unit: fc.constantFrom(...UNITS),
  margin: fc.constantFrom(0, 0, 1, 2.5, 7),
  tolerance: fc.constantFrom(0, 0, 0.001, 0.01, 0.2),
})

interface Drawn { quantity: string, bound: string, code8: number, unit: typeof UNITS[number], margin: number, tolerance: number }

function specOf(ls: Drawn[]): DeliverySpec {
  const limits: SpecLimit[] = ls.map((l, i) => {
    const cbcr = l.quantity === 'cb' || l.quantity === 'cr'
    const unit = cbcr ? 'code8' : l.unit
    // The value in the limit's own unit (code8 → unit), as a team would type it.
    const value = unit === 'code8' ? l.code8 : unit === 'code10' ? l.code8 * 4 : toUnit(l.code8, unit)
    return { id: `l${i}`, label: `limit ${i}`, quantity: l.quantity as SpecLimit['quantity'], bound: l.bound as 'min' | 'max', value, unit, warningMargin: l.margin, areaTolerance: l.tolerance }
  })
  return { name: 'random', title: 'random', description: '', limits }
}

// Inverse of scales.ts fromScale for the drawn code8 values, by its published scales (BT.601
// studio range: black 16, white 235; IRE with 7.5 setup; 700 mV white), computed, not stored.
function toUnit(code8: number, unit: typeof UNITS[number]): number {
  const u = (code8 - 16) / 219
  switch (unit) {
    case 'ire': return 7.5 + 92.5 * u
    case 'ire0': case 'pct': return 100 * u
    case 'mv': return 700 * u
    case 'mvNtsc': return (7.5 + 92.5 * u) * (1000 / 140)
    default: return code8
  }
}

function same(a: FrameAnalysis, b: FrameAnalysis, spec: DeliverySpec) {
  expect(b.verdict).toBe(a.verdict)
  expect(b.reasons).toEqual(a.reasons)
  expect(b.luma).toEqual(a.luma)
  expect(b.compositeIre).toEqual(a.compositeIre)
  expect(b.chroma).toEqual(a.chroma)
  expect(b.shares).toEqual(a.shares)
  const ta = emptyTimeline(1); const tb = emptyTimeline(1)
  recordFrame(ta, 0, a, spec); recordFrame(tb, 0, b, spec)
  expect(tb).toEqual(ta)
  const lv = (x: FrameAnalysis) => x.histograms.levels
  const top = (d: Uint32Array) => d.findLastIndex(n => n > 0)
  const bottom = (d: Uint32Array) => d.findIndex(n => n > 0)
  expect(top(lv(b).rgbMax)).toBe(top(lv(a).rgbMax))
  expect(bottom(lv(b).rgbMin)).toBe(bottom(lv(a).rgbMin))
  expect(lv(b).luma).toEqual(lv(a).luma)
  // The contract itself: the count at or beyond every threshold bin the spec reads.
  const tb2 = thresholdBins(spec)
  const sum = (d: Uint32Array, from: number, to: number) => d.subarray(Math.max(0, from), Math.max(0, to + 1)).reduce((x, y) => x + y, 0)
  for (const key of ['compMax', 'rgbMax'] as const) {
    for (const f of tb2[key]) expect(sum(lv(b)[key], f, 3071), `${key} ≥ ${f}`).toBe(sum(lv(a)[key], f, 3071))
  }
  for (const key of ['compMin', 'rgbMin'] as const) {
    for (const l of tb2[key]) expect(sum(lv(b)[key], 0, l), `${key} ≤ ${l}`).toBe(sum(lv(a)[key], 0, l))
  }
}

const planarKinds = fc.constantFrom('planar8', 'planar10')
const frameArb = fc.tuple(fc.record({
  w: fc.integer({ min: 1, max: 120 }).map(n => n * 2),
  h: fc.integer({ min: 1, max: 10 }),
  templates: fc.integer({ min: 1, max: 4 }),
  change: fc.constantFrom(0, 0.05, 0.3, 1),
  seed: fc.integer(),
}), planarKinds).map(([sh, kind]) => frameOf(sh, kind))

function check(input: FrameInput, spec: DeliverySpec, expectSummary: boolean | undefined) {
  const a = analyseFrame(input, { spec, spatialLevels: false })
  const b = analyseFrame(input, { spec, spatialLevels: false, levels: 'spec' })
  same(a, b, spec)
  if (expectSummary !== undefined) expect(b.histograms.levels.summaryOf !== undefined).toBe(expectSummary)
  return b
}

describe('a summary of the levels judges as the whole distributions do', () => {
  it('any planar 4:2:2 frame, any spec of up to five per-pixel limits', () => {
    fc.assert(fc.property(frameArb, fc.array(limit, { minLength: 1, maxLength: 5 }), (input, ls) => {
      check(input, specOf(ls), undefined)
    }), { numRuns: 400 })
  })

  it('the built-in specs without spatial limits, on grain', () => {
    const input = frameOf({ w: 400, h: 6, templates: 1, change: 1, seed: 11 }, 'planar10')
    for (const name of ['ntsc-setup', 'digital-studio']) {
      const b = check(input, builtinSpec(name)!, true)
      // What the summary leaves out is left out, not faked.
      expect(b.histograms.levels.r.every(n => n === 0)).toBe(true)
    }
  })

  it('pairs sent to the float route (bin-edge band widened) are added in the same way', () => {
    const saved = fastTuning.edgeEps
    fastTuning.edgeEps = 0.06
    try {
      fc.assert(fc.property(frameArb, fc.array(limit, { minLength: 1, maxLength: 4 }), (input, ls) => {
        check(input, specOf(ls), undefined)
      }), { numRuns: 150 })
    }
    finally { fastTuning.edgeEps = saved }
  })

  it('more than two thresholds on one distribution, or a spatial limit: whole distributions', () => {
    const input = frameOf({ w: 64, h: 4, templates: 2, change: 0.3, seed: 5 }, 'planar8')
    const three = specOf([0, 1, 2].map(i => ({ quantity: 'composite', bound: 'max', code8: 200 + 10 * i, unit: 'code8' as const, margin: 0, tolerance: 0 })))
    check(input, three, false)
    const two = specOf([0, 1].map(i => ({ quantity: 'composite', bound: 'max', code8: 200 + 10 * i, unit: 'code8' as const, margin: 0, tolerance: 0 })))
    check(input, two, true)
    check(input, builtinSpec('ebu-r103-v3')!, false)
  })
})
