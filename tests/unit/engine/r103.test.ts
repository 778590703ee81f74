// EBU R 103's measurement practice for gamut, as far as stills allow. Source: EBU R 103 v3.0
// (2020) Annex 1 — R', G', B' within −5 %…105 % judged after spatial low-pass filtering, with
// excursions over up to 1 % of the picture tolerated (EBU R 103 — memory). The
// filter is ours (3×3 binomial, lowpass.ts). Pictures are built to sit just inside and just
// outside: 16-bit studio-range R'G'B' (ITU-R BT.601-7 §2.5 coding ranges ×256 — clause from memory), so R' can
// exceed 100 %.
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, SPATIAL_KEYS, type DeliverySpec, type FrameInput } from '../../../shared/engine/index'

const W = 200
const H = 20

/** Mid grey (50 %) with vertical bars of R' = `level` (G', B' stay at 50 %), full height. */
function bars(level: number, columns: number[]): FrameInput {
  const code = (v: number) => Math.round((16 + 219 * v) * 256)
  const data = new Uint16Array(W * H * 3).fill(code(0.5))
  for (let y = 0; y < H; y++) for (const x of columns) data[(y * W + x) * 3] = code(level)
  return { kind: 'rgb', data, width: W, height: H, channels: 3, bitDepth: 16, range: 'studio' }
}
const run = (x0: number, n: number) => Array.from({ length: n }, (_, i) => x0 + i)

const ebu = builtinSpec('ebu-r103-v3')!
const unfiltered: DeliverySpec = { ...ebu, limits: ebu.limits.map(({ filter: _f, ...l }) => l) }
const gamutMax = (spec: DeliverySpec, input: FrameInput) => analyseFrame(input, { spec }).reasons.find(r => r.limit === 'rgb-max')

describe('EBU R 103 gamut practice', () => {
  it('the built-in spec judges R\'G\'B\' after the low-pass filter and names the practice', () => {
    expect(ebu.limits.filter(l => l.quantity === 'rgb').every(l => l.filter === 'lowpass')).toBe(true)
    expect(ebu.description).toMatch(/R 103 v3\.0\): R'G'B' is judged after spatial low-pass filtering/)
    expect(ebu.description).toMatch(/3×3 binomial kernel/)
  })

  it('a one-pixel overshoot of 109 % is a short transient: filtered it peaks at 79.5 %, inside', () => {
    // Ten single-pixel lines = 5 % of the picture, far over the 1 % tolerance unfiltered.
    const input = bars(1.09, [10, 30, 50, 70, 90, 110, 130, 150, 170, 190])
    expect(gamutMax(unfiltered, input)?.severity).toBe('fail')
    // Filtered: (50 + 2·109 + 50)/4 = 79.5 % (computed), below the 104 % caution point.
    expect(gamutMax(ebu, input)).toBeUndefined()
  })

  it('a 106 % bar four pixels wide is just inside: its two inner columns (1.0 % of the picture) are not over 1 %', () => {
    // Edge columns filter to (50 + 2·106 + 106)/4 = 92 %; inner ones stay 106 % (computed).
    const input = bars(1.06, run(100, 4))
    expect(gamutMax(unfiltered, input)?.severity).toBe('fail') // 4 columns = 2 %
    expect(gamutMax(ebu, input)).toBeUndefined()
  })

  it('a 106 % bar five pixels wide is just outside: three inner columns are 1.5 % of the picture', () => {
    const r = gamutMax(ebu, bars(1.06, run(100, 5)))
    expect(r?.severity).toBe('fail')
    expect(r!.share).toBeCloseTo(3 / W, 9)
    expect(r!.message).toMatch(/after low-pass/)
  })

  it('a wide bar at 104.9 % is in the caution band, at 105.1 % it fails', () => {
    expect(gamutMax(ebu, bars(1.049, run(50, 40)))?.severity).toBe('caution')
    expect(gamutMax(ebu, bars(1.051, run(50, 40)))?.severity).toBe('fail')
  })
})

describe('minimum region of 3×3 pixels', () => {
  // Luma white limit at 100 % (code 235, BT.601 Table 3) with zero area tolerance; picture mid grey.
  const spec = (minRegion?: '3x3'): DeliverySpec => ({
    name: 'white', title: 'White', description: '',
    limits: [{ id: 'white', label: 'Luma above 100 %', quantity: 'luma', bound: 'max', value: 100, unit: 'pct', warningMargin: 0, areaTolerance: 0, ...(minRegion ? { minRegion } : {}) }],
  })
  /** Mid grey with a square of super-white (R'=G'=B' = 106 %) of `n`×`n` pixels at (50, 5). */
  function square(n: number): FrameInput {
    const code = (v: number) => Math.round((16 + 219 * v) * 256)
    const data = new Uint16Array(W * H * 3).fill(code(0.5))
    for (let y = 5; y < 5 + n; y++) for (let x = 50; x < 50 + n; x++) data.fill(code(1.06), (y * W + x) * 3, (y * W + x) * 3 + 3)
    return { kind: 'rgb', data, width: W, height: H, channels: 3, bitDepth: 16, range: 'studio' }
  }
  const verdict = (s: DeliverySpec, n: number) => analyseFrame(square(n), { spec: s })

  it('a lone hot pixel fails per pixel, and is ignored when a 3×3 region must be beyond', () => {
    expect(verdict(spec(), 1).verdict).toBe('fail')
    expect(verdict(spec('3x3'), 1).verdict).toBe('pass')
  })

  it('a 2×2 block is just inside (no 3×3 block fits), a 3×3 block just outside: one pixel counts', () => {
    expect(verdict(spec('3x3'), 2).verdict).toBe('pass')
    const r = verdict(spec('3x3'), 3).reasons[0]!
    expect(r.severity).toBe('fail')
    expect(r.share).toBe(1 / (W * H)) // only the centre pixel's 3×3 block is entirely beyond
    expect(r.message).toMatch(/3×3-pixel regions/)
    // A 5×5 block: the 3×3 centres lie inside it, 9 pixels.
    expect(verdict(spec('3x3'), 5).reasons[0]!.share).toBe(9 / (W * H))
  })
})

describe('leaving out the spatial pass (a clip\'s timeline)', () => {
  it('is refused by a spec that judges on it: the low-pass and 3×3 verdicts stay as with the pass', () => {
    // The 109 % one-pixel bars above: filtered inside, unfiltered a fail (computed above).
    const input = bars(1.09, [10, 30, 50, 70, 90, 110, 130, 150, 170, 190])
    const without = analyseFrame(input, { spec: ebu, spatialLevels: false })
    expect(without).toEqual(analyseFrame(input, { spec: ebu }))
    expect(without.reasons.find(r => r.limit === 'rgb-max')).toBeUndefined()
  })

  it('is left out for a spec without such limits: same verdict and statistics, no spatial distributions', () => {
    const input = bars(1.06, run(100, 5))
    const withPass = analyseFrame(input, { spec: unfiltered })
    const without = analyseFrame(input, { spec: unfiltered, spatialLevels: false })
    expect(withPass.histograms.levels.rgbMaxLp).toBeDefined()
    const strip = (a: typeof without) => ({ ...a, histograms: { ...a.histograms, levels: { ...a.histograms.levels, ...Object.fromEntries(SPATIAL_KEYS.map((k) => [k, 0])) } } })
    for (const k of SPATIAL_KEYS) expect(without.histograms.levels[k], k).toBeUndefined()
    expect(strip(without)).toEqual(strip(withPass))
    expect(without.verdict).toBe('fail')
  })
})
