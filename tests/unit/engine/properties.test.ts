// Properties that hold for any frame (fast-check). Sources: BT.601-7 §2.5 (grey has
// Pb = Pr = 0), SMPTE 170M scale definitions (memory), the area tolerance of a delivery spec (EBU R 103 v3.0).
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { analyseFrame, evaluateSpec, fromScale, LEVEL_SCALES, linePlot, toScale } from '../../../shared/engine/index'
import type { DeliverySpec, FrameInput } from '../../../shared/engine/index'

const dims = fc.record({ w: fc.integer({ min: 1, max: 24 }).map(n => n * 2), h: fc.integer({ min: 1, max: 12 }) })

const rgbFrame = dims.chain(({ w, h }) => fc.record({
  deep: fc.boolean(),
  range: fc.constantFrom<'full' | 'studio'>('full', 'studio'),
  channels: fc.constantFrom<3 | 4>(3, 4),
  seed: fc.array(fc.integer({ min: 0, max: 65535 }), { minLength: w * h * 4, maxLength: w * h * 4 }),
}).map(({ deep, range, channels, seed }): FrameInput => {
  const n = w * h * channels
  const data = deep ? new Uint16Array(n) : new Uint8Array(n)
  for (let i = 0; i < n; i++) data[i] = deep ? seed[i]! : seed[i]! >> 8
  return { kind: 'rgb', data, width: w, height: h, channels, bitDepth: deep ? 16 : 8, range }
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

const anyFrame = fc.oneof(rgbFrame, yccFrame)

const sum = (a: Uint32Array) => a.reduce((s, v) => s + v, 0)

describe('properties', () => {
  it('grey pixels (R\' = G\' = B\') carry no chroma and sit on the composite trace of luma', () => {
    fc.assert(fc.property(fc.array(fc.integer({ min: 0, max: 65535 }), { minLength: 1, maxLength: 64 }), fc.boolean(), fc.constantFrom<'full' | 'studio'>('full', 'studio'), (greys, deep, range) => {
      const w = greys.length
      const data = deep ? new Uint16Array(w * 3) : new Uint8Array(w * 3)
      greys.forEach((g, i) => { const v = deep ? g : g >> 8; data[i * 3] = v; data[i * 3 + 1] = v; data[i * 3 + 2] = v })
      const input: FrameInput = { kind: 'rgb', data, width: w, height: 1, channels: 3, bitDepth: deep ? 16 : 8, range }
      const a = analyseFrame(input)
      expect(a.chroma.ppMaxIre).toBe(0)
      expect(a.chroma.cbMin).toBe(128); expect(a.chroma.cbMax).toBe(128)
      expect(a.chroma.crMin).toBe(128); expect(a.chroma.crMax).toBe(128)
      expect(a.compositeIre.max).toBeCloseTo(a.lumaIre.max, 9)
      expect(a.compositeIre.min).toBeCloseTo(a.lumaIre.min, 9)
      for (const s of linePlot(input, 0).samples) {
        expect(s.chromaPpIre).toBe(0)
        expect(s.phaseDeg).toBeNull()
      }
    }), { numRuns: 60 })
  })

  it('every histogram and level distribution sums to the pixel count', () => {
    fc.assert(fc.property(anyFrame, (input) => {
      const a = analyseFrame(input)
      const n = input.width * input.height
      const h = a.histograms
      for (const d of [h.y, h.cb, h.cr, h.r, h.g, h.b, h.levels.luma, h.levels.compMax, h.levels.compMin, h.levels.rgbMax, h.levels.rgbMin, h.levels.r, h.levels.g, h.levels.b]) expect(sum(d)).toBe(n)
      expect(h.bins).toBe(a.bitDepth === 8 ? 256 : 1024)
    }), { numRuns: 80 })
  })

  it('histograms count the source codes exactly: R, G, B of 8-bit R\'G\'B\', Y, Cb, Cr of Y\'CbCr', () => {
    fc.assert(fc.property(fc.oneof(rgbFrame, yccFrame), (input) => {
      const a = analyseFrame(input)
      const h = a.histograms
      const count = (vals: ArrayLike<number>, bins: number, step: number, offset: number, per = 1) => {
        const out = new Array<number>(bins).fill(0)
        for (let i = 0; i < vals.length; i += step) out[vals[i + offset]!]! += per
        return out
      }
      if (input.kind === 'rgb' && input.bitDepth === 8 && input.range === 'full') {
        expect(Array.from(h.r)).toEqual(count(input.data, 256, input.channels, 0))
        expect(Array.from(h.g)).toEqual(count(input.data, 256, input.channels, 1))
        expect(Array.from(h.b)).toEqual(count(input.data, 256, input.channels, 2))
      }
      if (input.kind === 'planar') {
        const bins = input.bitDepth === 8 ? 256 : 1024
        expect(Array.from(h.y)).toEqual(count(input.y, bins, 1, 0))
        // 4:2:2: each chroma sample stands for two pixels (widths here are even).
        expect(Array.from(h.cb)).toEqual(count(input.cb, bins, 1, 0, 2))
        expect(Array.from(h.cr)).toEqual(count(input.cr, bins, 1, 0, 2))
      }
    }), { numRuns: 80 })
  })

  it('the density pass (in stripes) measures the same as the plain pass, and its densities hold every pixel', () => {
    const wide = fc.record({ w: fc.integer({ min: 40, max: 160 }).map(n => n * 2), h: fc.integer({ min: 1, max: 4 }), seed: fc.integer() })
      .map(({ w, h, seed }): FrameInput => {
        const cw = w / 2
        let s = seed >>> 0
        const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 22
        const y = new Uint16Array(w * h).map(() => next())
        const cb = new Uint16Array(cw * h).map(() => next())
        const cr = new Uint16Array(cw * h).map(() => next())
        return { kind: 'planar', y, cb, cr, width: w, height: h, bitDepth: 10, subsampling: '422' }
      })
    fc.assert(fc.property(fc.oneof(wide, rgbFrame), (input) => {
      const plain = analyseFrame(input)
      const dense = analyseFrame(input, { keepDensities: true })
      const { histograms: h1, waveform, vectorscope, rangeMask, ...rest1 } = dense
      const { histograms: h0, ...rest0 } = plain
      expect(rest1).toEqual(rest0)
      expect(h1).toEqual(h0)
      const n = input.width * input.height
      expect(sum(waveform!.luma)).toBe(n)
      expect(sum(waveform!.flat)).toBe(2 * n)
      for (const d of [waveform!.rgb.r, waveform!.rgb.g, waveform!.rgb.b, vectorscope!.data]) expect(sum(d)).toBe(n)
      // The range mask is the frame's size here (under 1280 wide), and with the default spec's
      // zero area tolerance a frame fails exactly when some pixel is beyond a limit.
      expect([rangeMask!.width, rangeMask!.height]).toEqual([input.width, input.height])
      expect(rangeMask!.data.some(v => v !== 0)).toBe(dense.verdict === 'fail')
    }), { numRuns: 25 })
  })

  it('statistics are ordered: min ≤ p1 ≤ p10 ≤ p50 ≤ p90 ≤ p99 ≤ max, mean within, shares in 0..1', () => {
    fc.assert(fc.property(anyFrame, (input) => {
      const a = analyseFrame(input)
      const l = a.luma
      expect(l.min).toBeLessThanOrEqual(l.p1)
      expect(l.p1).toBeLessThanOrEqual(l.p10); expect(l.p10).toBeLessThanOrEqual(l.p50)
      expect(l.p50).toBeLessThanOrEqual(l.p90); expect(l.p90).toBeLessThanOrEqual(l.p99)
      expect(l.p99).toBeLessThanOrEqual(l.max)
      expect(l.mean).toBeGreaterThanOrEqual(l.min - 1e-9); expect(l.mean).toBeLessThanOrEqual(l.max + 1e-9)
      expect(a.compositeIre.max).toBeGreaterThanOrEqual(a.lumaIre.max - 1e-9)
      expect(a.compositeIre.min).toBeLessThanOrEqual(a.lumaIre.min + 1e-9)
      for (const v of Object.values(a.shares)) { expect(v).toBeGreaterThanOrEqual(0); expect(v).toBeLessThanOrEqual(1) }
    }), { numRuns: 80 })
  })

  it('scales are increasing, invert exactly, and agree with each other (SMPTE 170M definitions — memory)', () => {
    fc.assert(fc.property(fc.double({ min: -300, max: 600, noNaN: true }), fc.double({ min: 0.001, max: 100, noNaN: true }), (c, d) => {
      for (const s of LEVEL_SCALES) {
        expect(toScale(c + d, s)).toBeGreaterThan(toScale(c, s))
        expect(fromScale(toScale(c, s), s)).toBeCloseTo(c, 8)
      }
      // IRE with setup is 7.5 + 0.925 × IRE without setup; percent equals IRE without setup;
      // component mV is 7 × percent; 10-bit is 4 × 8-bit; NTSC mV is IRE × 1000/140.
      expect(toScale(c, 'ire')).toBeCloseTo(7.5 + 0.925 * toScale(c, 'ire0'), 9)
      expect(toScale(c, 'pct')).toBeCloseTo(toScale(c, 'ire0'), 9)
      expect(toScale(c, 'mv')).toBeCloseTo(7 * toScale(c, 'pct'), 9)
      expect(toScale(c, 'code10')).toBeCloseTo(4 * c, 9)
      expect(toScale(c, 'mvNtsc')).toBeCloseTo(toScale(c, 'ire') * 1000 / 140, 9)
    }))
    // Fixed points: 16 → 7.5 IRE, 0 IRE0, 0 mV, 53.6 mV NTSC; 235 → 100 IRE, 700 mV, 714.3 mV, 940.
    expect(toScale(16, 'ire')).toBe(7.5); expect(toScale(235, 'ire')).toBeCloseTo(100, 12)
    expect(toScale(16, 'mv')).toBe(0); expect(toScale(235, 'mv')).toBeCloseTo(700, 12)
    expect(toScale(16, 'mvNtsc')).toBeCloseTo(53.571, 3); expect(toScale(235, 'mvNtsc')).toBeCloseTo(714.286, 3)
    expect(toScale(235, 'code10')).toBe(940); expect(toScale(16, 'code10')).toBe(64)
  })

  it('a frame with k pixels over a limit passes until their share exceeds the area tolerance', () => {
    fc.assert(fc.property(
      fc.integer({ min: 1, max: 20 }), fc.integer({ min: 1, max: 20 }), fc.integer({ min: 1, max: 5 }), fc.integer({ min: 0, max: 200 }),
      (pairs, h, k0, tolPermille) => {
        const w = pairs * 2
        const n = w * h
        const k = Math.min(k0, n)
        const data = new Uint8Array(n * 2)
        for (let i = 0; i < n; i += 2) { data[i * 2] = 128; data[i * 2 + 1] = 120; data[i * 2 + 2] = 128; data[i * 2 + 3] = 120 }
        // k pixels at code 250 (106.9 IRE), the rest at mid grey.
        for (let i = 0; i < k; i++) data[i * 2 + 1] = 250
        const input: FrameInput = { kind: 'uyvy', data, width: w, height: h }
        const tol = tolPermille / 1000
        const spec: DeliverySpec = {
          name: 't', title: 't', description: 'property test',
          limits: [{ id: 'luma-max', label: 'hot', quantity: 'luma', bound: 'max', value: 100, unit: 'ire', warningMargin: 0, areaTolerance: tol }],
        }
        const a = analyseFrame(input, { spec })
        const share = k / n
        expect(a.verdict).toBe(share > tol ? 'fail' : 'pass')
        expect(evaluateSpec(a, spec).verdict).toBe(a.verdict)
        if (a.verdict === 'fail') {
          expect(a.reasons[0]!.share).toBeCloseTo(share, 12)
          expect(a.reasons[0]!.value).toBeCloseTo(7.5 + 92.5 * (250 - 16) / 219, 9)
        }
      },
    ), { numRuns: 150 })
  })
})
