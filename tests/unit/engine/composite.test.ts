// NTSC (System M) levels of the 75 % and 100 % bars: luma IRE, chroma p-p, phase, composite
// extremes. Sources: SMPTE 170M and SMPTE EG 1 (memory): U = 0.492111(B'−Y'),
// V = 0.877283(R'−Y'), IRE = 7.5 + 92.5·Y', p-p = 2·92.5·C, phase = atan2(V, U).
// Expected values are computed below from those equations, independently of the engine's
// code, and also checked against the published rounded table (±0.5 IRE, ±1°).
import { describe, expect, it } from 'vitest'
import { analyseFrame, barRgb, linePlot } from '../../../shared/engine/index'
import type { BarName } from '../../../shared/engine/index'
import { solidRgb16 } from './helpers'

function expected(name: BarName, amp: number) {
  const c = barRgb(name, amp)
  const y = 0.299 * c.r + 0.587 * c.g + 0.114 * c.b
  const u = 0.492111 * (c.b - y)
  const v = 0.877283 * (c.r - y)
  const C = Math.sqrt(u * u + v * v)
  let phase = Math.atan2(v, u) * 180 / Math.PI
  if (phase < 0) phase += 360
  return { lumaIre: 7.5 + 92.5 * y, ppIre: 2 * 92.5 * C, phase, hi: 7.5 + 92.5 * (y + C), lo: 7.5 + 92.5 * (y - C) }
}

// SMPTE EG 1 75/7.5/75/7.5 bars (memory; computed from the SMPTE 170M equations): luma IRE / chroma p-p IRE / phase.
const PUBLISHED_75: Array<[BarName, number, number, number | null]> = [
  ['yellow', 69.0, 62.1, 167.1], ['cyan', 56.1, 87.7, 283.5], ['green', 48.2, 81.9, 240.7],
  ['magenta', 36.2, 81.9, 60.7], ['red', 28.2, 87.7, 103.5], ['blue', 15.4, 62.1, 347.1],
]
// SMPTE EG 1 100 % bars (memory; computed): luma then chroma p-p.
const PUBLISHED_100: Array<[BarName, number, number]> = [
  ['yellow', 89.5, 82.8], ['cyan', 72.3, 117.0], ['green', 61.8, 109.2],
  ['magenta', 45.7, 109.2], ['red', 35.2, 117.0], ['blue', 18.0, 82.8],
]

function measure(name: BarName, amp: number) {
  const c = barRgb(name, amp)
  const input = solidRgb16(c.r, c.g, c.b)
  const s = linePlot(input, 0).samples[1]!
  return { s, a: analyseFrame(input) }
}

describe('75 % bars on the NTSC scale (SMPTE EG 1 — memory)', () => {
  it('grey is 76.9 IRE with no chroma, black 7.5 IRE', () => {
    // 7.5 + 92.5·0.75 = 76.875
    expect(measure('white', 0.75).s.lumaIre).toBeCloseTo(76.875, 3)
    expect(measure('white', 0.75).s.chromaPpIre).toBeCloseTo(0, 9)
    expect(measure('black', 0.75).s.lumaIre).toBeCloseTo(7.5, 9)
  })

  for (const [name, luma, pp, phase] of PUBLISHED_75) {
    it(`${name}: computed exactly, and ${luma} IRE / ${pp} IRE p-p / ${phase}° within 0.5 IRE and 1°`, () => {
      const e = expected(name, 0.75)
      const { s, a } = measure(name, 0.75)
      // 16-bit input quantises 0.75 to 49151/65535: 4e-6 off, far below these tolerances.
      expect(s.lumaIre).toBeCloseTo(e.lumaIre, 3)
      expect(s.chromaPpIre).toBeCloseTo(e.ppIre, 3)
      expect(s.phaseDeg!).toBeCloseTo(e.phase, 2)
      expect(a.chroma.ppMaxIre).toBeCloseTo(e.ppIre, 3)
      expect(Math.abs(s.lumaIre - luma)).toBeLessThanOrEqual(0.5)
      expect(Math.abs(s.chromaPpIre - pp)).toBeLessThanOrEqual(0.5)
      expect(Math.abs(s.phaseDeg! - phase!)).toBeLessThanOrEqual(1)
    })
  }

  it('composite extremes of the 75 % bars are +100.0 IRE (yellow, cyan) and −15.6 IRE (red, blue)', () => {
    for (const n of ['yellow', 'cyan'] as const) {
      expect(Math.abs(measure(n, 0.75).a.compositeIre.max - 100.0)).toBeLessThanOrEqual(0.05)
    }
    for (const n of ['red', 'blue'] as const) {
      expect(Math.abs(measure(n, 0.75).a.compositeIre.min - -15.6)).toBeLessThanOrEqual(0.05)
    }
  })
})

describe('100 % bars on the NTSC scale (SMPTE EG 1 — memory; computed)', () => {
  it('white is 100 IRE', () => {
    expect(measure('white', 1).s.lumaIre).toBeCloseTo(100, 9)
  })

  for (const [name, luma, pp] of PUBLISHED_100) {
    it(`${name}: computed exactly, and ${luma} IRE / ${pp} IRE p-p within 0.5 IRE`, () => {
      const e = expected(name, 1)
      const { s } = measure(name, 1)
      expect(s.lumaIre).toBeCloseTo(e.lumaIre, 6)
      expect(s.chromaPpIre).toBeCloseTo(e.ppIre, 6)
      expect(s.compMaxIre).toBeCloseTo(e.hi, 6)
      expect(s.compMinIre).toBeCloseTo(e.lo, 6)
      expect(Math.abs(s.lumaIre - luma)).toBeLessThanOrEqual(0.5)
      expect(Math.abs(s.chromaPpIre - pp)).toBeLessThanOrEqual(0.5)
    })
  }

  it('composite extremes of the 100 % bars are +130.8 and −23.3 IRE', () => {
    const hi = Math.max(...(['yellow', 'cyan'] as const).map(n => measure(n, 1).a.compositeIre.max))
    const lo = Math.min(...(['red', 'blue'] as const).map(n => measure(n, 1).a.compositeIre.min))
    expect(Math.abs(hi - 130.8)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(lo - -23.3)).toBeLessThanOrEqual(0.05)
  })

  it('the 100 % bars break the ±120/−20 IRE composite limits; the 75 % bars do not', () => {
    const bars = (amp: number) => {
      const names: BarName[] = ['white', 'yellow', 'cyan', 'green', 'magenta', 'red', 'blue', 'black']
      const w = names.length * 4
      const data = new Uint16Array(w * 3)
      names.forEach((n, k) => {
        const c = barRgb(n, n === 'white' ? 1 : amp)
        for (let x = k * 4; x < k * 4 + 4; x++) {
          data[x * 3] = Math.round(c.r * 65535); data[x * 3 + 1] = Math.round(c.g * 65535); data[x * 3 + 2] = Math.round(c.b * 65535)
        }
      })
      return analyseFrame({ kind: 'rgb', data, width: w, height: 1, channels: 3, bitDepth: 16, range: 'full' })
    }
    // 100 %: yellow and cyan reach +130.8 (above +120), red and blue −23.3 (below −20): 4 of 8 bars.
    expect(bars(1).shares.compositeOut).toBeCloseTo(4 / 8, 9)
    expect(bars(1).verdict).toBe('fail')
    expect(bars(0.75).shares.compositeOut).toBe(0)
  })
})

describe('burst reference and phase convention (SMPTE 170M — memory)', () => {
  it('−(B\'−Y\') alone sits at 180°, the burst phase; +(R\'−Y\') at 90°', () => {
    // A pixel with only negative U: Cb below centre, Cr at centre.
    const neg = linePlot({ kind: 'uyvy', data: new Uint8Array([64, 126, 128, 126]), width: 2, height: 1 }, 0).samples[0]!
    expect(neg.phaseDeg).toBeCloseTo(180, 9)
    const posV = linePlot({ kind: 'uyvy', data: new Uint8Array([128, 126, 192, 126]), width: 2, height: 1 }, 0).samples[0]!
    expect(posV.phaseDeg).toBeCloseTo(90, 9)
  })
})
