// Judging again from stored level distributions must give what a fresh measurement gives.
// Sources: the engine's own measurement is the reference here (the property is an identity);
// scale definitions SMPTE 170M / ITU-R BT.1700 (IRE with and without setup — memory), ITU-R BT.601-7 §2.5 (studio codes
// 16/235, 64/940); component 0/700 mV (ITU-R BT.601 analogue levels, memory).
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  analyseFrame, DeliverySpecSchema, fromScale, LEVEL_BINS, LEVEL_KEYS, packDist, packLevels, SPEC_QUANTITIES, toScale, unpackDist, unpackLevels,
} from '../../../shared/engine/index'
import type { DeliverySpec, FrameInput, LevelScale, SpecLimit } from '../../../shared/engine/index'
import { analysisJson } from '../../../shared/utils/report'
import { convertLevel, convertLimitUnit, judgeStored, summariseChanges, unitsFor, type StoredMeasurement } from '../../../shared/utils/specs'

const dims = fc.record({ w: fc.integer({ min: 1, max: 20 }).map(n => n * 2), h: fc.integer({ min: 1, max: 10 }) })

const rgbFrame = dims.chain(({ w, h }) => fc.record({
  deep: fc.boolean(),
  range: fc.constantFrom<'full' | 'studio'>('full', 'studio'),
  seed: fc.array(fc.integer({ min: 0, max: 65535 }), { minLength: w * h * 3, maxLength: w * h * 3 }),
}).map(({ deep, range, seed }): FrameInput => {
  const n = w * h * 3
  const data = deep ? new Uint16Array(n) : new Uint8Array(n)
  for (let i = 0; i < n; i++) data[i] = deep ? seed[i]! : seed[i]! >> 8
  return { kind: 'rgb', data, width: w, height: h, channels: 3, bitDepth: deep ? 16 : 8, range }
}))

const yccFrame = dims.chain(({ w, h }) => fc.record({
  ten: fc.boolean(),
  codes: fc.array(fc.integer({ min: 0, max: 1023 }), { minLength: w * h * 2, maxLength: w * h * 2 }),
}).map(({ ten, codes }): FrameInput => {
  const n = w * h
  const cn = (w / 2) * h
  const mk = (k: number) => (ten ? new Uint16Array(k) : new Uint8Array(k))
  const y = mk(n); const cb = mk(cn); const cr = mk(cn)
  for (let i = 0; i < n; i++) y[i] = ten ? codes[i]! : codes[i]! >> 2
  for (let i = 0; i < cn; i++) { cb[i] = ten ? codes[n + i]! : codes[n + i]! >> 2; cr[i] = ten ? codes[n + cn + i]! : codes[n + cn + i]! >> 2 }
  return { kind: 'planar', y, cb, cr, width: w, height: h, bitDepth: ten ? 10 : 8, subsampling: '422' }
}))

/** A random limit with its threshold somewhere a frame's levels can reach (codes −20…270). */
const limit = (i: number) => fc.record({
  quantity: fc.constantFrom(...SPEC_QUANTITIES),
  bound: fc.constantFrom<'min' | 'max'>('min', 'max'),
  code8: fc.double({ min: -20, max: 270, noNaN: true }),
  unitPick: fc.nat(6),
  margin: fc.double({ min: 0, max: 30, noNaN: true }),
  areaTolerance: fc.constantFrom(0, 0.001, 0.01, 0.1, 0.5),
  lowpass: fc.boolean(),
  region: fc.boolean(),
}).map((r): SpecLimit => {
  const units = unitsFor(r.quantity)
  const unit = units[r.unitPick % units.length]!
  return {
    id: `l${i}`, label: `Limit ${i}`, quantity: r.quantity, bound: r.bound, unit,
    value: toScale(r.code8, unit), warningMargin: r.margin, areaTolerance: r.areaTolerance,
    ...(r.quantity === 'rgb' && r.lowpass ? { filter: 'lowpass' as const } : {}),
    ...(r.region && r.quantity !== 'cb' && r.quantity !== 'cr' && !(r.quantity === 'rgb' && r.lowpass) ? { minRegion: '3x3' as const } : {}),
  }
})

const spec = fc.integer({ min: 1, max: 6 }).chain(n => fc.tuple(...Array.from({ length: n }, (_, i) => limit(i))))
  .map((limits): DeliverySpec => DeliverySpecSchema.parse({ name: 'random', title: 'Random spec', description: '', limits }))

/** What the worker stores, through JSON as the database keeps it. */
function store(input: FrameInput): StoredMeasurement {
  const a = analyseFrame(input)
  const h = a.histograms
  return JSON.parse(JSON.stringify({
    result: analysisJson(a, 'ntsc-setup'),
    histograms: { bins: h.bins, cb: [...h.cb], cr: [...h.cr] },
    levels: packLevels(h.levels),
  })) as StoredMeasurement
}

describe('re-judging from stored level distributions', () => {
  it('a frame measured once and judged against three specs gives what measuring it afresh against each gives', () => {
    fc.assert(fc.property(fc.oneof(rgbFrame, yccFrame), spec, spec, spec, (input, s1, s2, s3) => {
      const stored = store(input)
      for (const s of [s1, s2, s3]) {
        const fresh = analyseFrame(input, { spec: s })
        const again = judgeStored(stored, s)
        expect(again.verdict).toBe(fresh.verdict)
        expect(again.reasons.map(r => [r.limit, r.severity, r.share, r.threshold])).toEqual(fresh.reasons.map(r => [r.limit, r.severity, r.share, r.threshold]))
        // The reported extreme comes from the stored statistics, rounded to 0.001 on storage
        // (report.ts). The widest case: composite is kept in IRE, and 0.0005 IRE read as a 10-bit
        // code is 0.0005 · 219/92.5 · 4 = 0.00474 (computed; checked at 0.0048 for float noise).
        again.reasons.forEach((r, i) => expect(Math.abs(r.value - fresh.reasons[i]!.value)).toBeLessThanOrEqual(0.0048))
      }
    }), { numRuns: 150 })
  })

  it('packed distributions unpack to the same counts', () => {
    fc.assert(fc.property(fc.array(fc.tuple(fc.nat(LEVEL_BINS - 1), fc.integer({ min: 1, max: 2 ** 32 - 1 })), { maxLength: 40 }), (cells) => {
      const d = new Uint32Array(LEVEL_BINS)
      for (const [i, v] of cells) d[i] = v
      expect(unpackDist(JSON.parse(JSON.stringify(packDist(d))), LEVEL_BINS)).toEqual(d)
    }))
    const a = analyseFrame({ kind: 'rgb', data: new Uint8Array([0, 0, 0, 255, 255, 255, 10, 200, 30, 90, 90, 90]), width: 2, height: 2, channels: 3, bitDepth: 8, range: 'full' })
    const back = unpackLevels(packLevels(a.histograms.levels))
    for (const k of LEVEL_KEYS) expect(back[k], k).toEqual(a.histograms.levels[k])
    // A four-pixel picture packs to under 700 bytes of JSON (13 distributions of 4 samples), not 13 × 3072 counts.
    expect(JSON.stringify(packLevels(a.histograms.levels)).length).toBeLessThan(700)
  })

  it('a packed distribution that does not fit is refused', () => {
    expect(() => unpackDist({ o: LEVEL_BINS - 1, d: 'AQE=' }, LEVEL_BINS)).toThrow(/does not fit/)
    expect(() => unpackDist({ o: 0, d: 'gA==' }, LEVEL_BINS)).toThrow(/ends inside/)
    expect(() => unpackDist({ o: 0, d: 'A*AA' }, LEVEL_BINS)).toThrow(/base64/)
  })
})

describe('thresholds in the unit a person picks', () => {
  // Each row is one level on every scale (ITU-R BT.601-7 §2.5 and SMPTE 170M — memory; 700 mV component white, memory).
  const rows: Array<Partial<Record<LevelScale, number>>> = [
    { code8: 16, code10: 64, ire: 7.5, ire0: 0, mv: 0, pct: 0 },
    { code8: 235, code10: 940, ire: 100, ire0: 100, mv: 700, pct: 100 },
  ]
  it('round-trips exactly at the levels the standards name: 16/235, 64/940, 7.5/100 IRE, 0/700 mV', () => {
    for (const row of rows) {
      for (const [from, v] of Object.entries(row) as Array<[LevelScale, number]>) {
        for (const [to, w] of Object.entries(row) as Array<[LevelScale, number]>) {
          expect(convertLevel(v, from, to), `${v} ${from} → ${to}`).toBe(w)
          expect(convertLevel(convertLevel(v, from, to), to, from)).toBe(v)
        }
      }
    }
    // Without tidying, IRE with setup → code is exact at these points already (16 + 0·219/92.5).
    expect(fromScale(7.5, 'ire')).toBe(16)
    expect(fromScale(100, 'ire')).toBe(235)
  })

  it('a limit converted to another unit judges every frame the same', () => {
    const white = { id: 'w', label: 'White', quantity: 'luma' as const, bound: 'max' as const, value: 100, unit: 'ire' as LevelScale, warningMargin: 2, areaTolerance: 0 }
    const mv = convertLimitUnit(white, 'mv')
    expect(mv.value).toBe(700)
    // 2 IRE on the setup scale = 2·219/92.5 codes = 2·700/92.5 mV = 15.135135 mV.
    expect(mv.warningMargin).toBe(15.135135)
    const back = convertLimitUnit(mv, 'ire')
    expect(back.value).toBe(100)
    expect(back.warningMargin).toBe(2)
    expect(convertLimitUnit(white, 'code10').value).toBe(940)
  })

  it('the preview sentence counts each transition', () => {
    const c = (from: 'pass' | 'caution' | 'fail', to: 'pass' | 'caution' | 'fail') => ({ from, to })
    expect(summariseChanges([...Array(9)].map(() => c('pass', 'fail')).concat([...Array(5)].map(() => c('fail', 'caution')))).text)
      .toBe('14 frames change verdict: 9 pass → fail, 5 fail → caution')
    expect(summariseChanges([c('pass', 'caution')]).text).toBe('1 frame changes verdict: 1 pass → caution')
    expect(summariseChanges([]).text).toBe('No frame changes verdict')
  })
})
