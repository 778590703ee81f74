// Delivery specs and the verdict. Sources: the built-in specs' own published figures,
// EBU R 103 v3.0 (2020) figures, NTSC practice, BT.601 Table 3 (studio range).
import { describe, expect, it } from 'vitest'
import { analyseFrame, BUILTIN_SPECS, builtinSpec, DeliverySpecSchema, evaluateSpec, fromScale } from '../../../shared/engine/index'
import type { DeliverySpec } from '../../../shared/engine/index'
import { solidRgb16, uyvyRow } from './helpers'

describe('built-in delivery specs', () => {
  it('all three validate against the schema and name their sources', () => {
    expect(BUILTIN_SPECS.map(s => s.name)).toEqual(['ntsc-setup', 'digital-studio', 'ebu-r103-v3'])
    for (const s of BUILTIN_SPECS) {
      expect(DeliverySpecSchema.parse(s)).toEqual(s)
      expect(s.description).toMatch(/Source/i)
    }
    expect(builtinSpec('ntsc-setup')!.description).toMatch(/SMPTE 170M/)
    expect(builtinSpec('ntsc-setup')!.description).toMatch(/BT\.1700/)
    // The description is printed on the producer's sheet: it cites the standard and says
    // plainly what is common practice, without the engineers' caveats (SMPTE 170M's clause is
    // recalled from memory; no published standard was found for the −20 IRE composite floor).
    expect(builtinSpec('ntsc-setup')!.description).toMatch(/Common practice \(no published standard\): the −20 IRE/)
    for (const s of BUILTIN_SPECS) expect(s.description).not.toMatch(/from memory|no standard found/i)
    expect(builtinSpec('digital-studio')!.description).toMatch(/BT\.601/)
    expect(builtinSpec('ebu-r103-v3')!.description).toMatch(/R 103 v3\.0.*supersedes the v1/)
  })

  it('EBU R 103 v3.0: −5 %…105 % is 8-bit 5–246 and 10-bit 20–984', () => {
    const ebu = builtinSpec('ebu-r103-v3')!
    const lo = ebu.limits.find(l => l.id === 'luma-min')!
    const hi = ebu.limits.find(l => l.id === 'luma-max')!
    // 16 − 0.05·219 = 5.05; 16 + 1.05·219 = 245.95; ×4 = 20.2 and 983.8.
    expect(Math.round(fromScale(lo.value, 'pct'))).toBe(5)
    expect(Math.round(fromScale(hi.value, 'pct'))).toBe(246)
    expect(Math.round(4 * fromScale(lo.value, 'pct'))).toBe(20)
    expect(Math.round(4 * fromScale(hi.value, 'pct'))).toBe(984)
    expect(hi.areaTolerance).toBe(0.01)
    // The caution thresholds sit at the superseded v1 luma figures, −1 % and 103 %.
    expect(hi.value - hi.warningMargin).toBe(103)
    expect(lo.value + lo.warningMargin).toBe(-1)
  })

  it('NTSC with setup: 7.5–100 IRE luma, −20…+120 IRE composite (ITU-R BT.1700 peak; −20 IRE NTSC practice)', () => {
    const l = Object.fromEntries(builtinSpec('ntsc-setup')!.limits.map(x => [x.id, x.value]))
    expect(l).toEqual({ 'luma-min': 7.5, 'luma-max': 100, 'composite-min': -20, 'composite-max': 120 })
  })

  it('the schema refuses malformed specs', () => {
    const base = builtinSpec('digital-studio')!
    const bad = (patch: (s: DeliverySpec) => unknown) => DeliverySpecSchema.safeParse(patch(structuredClone(base) as DeliverySpec)).success
    expect(bad(s => s)).toBe(true)
    expect(bad(s => ({ ...s, limits: [] }))).toBe(false)
    expect(bad(s => ({ ...s, limits: [...s.limits, s.limits[0]] }))).toBe(false) // duplicate id
    expect(bad(s => ({ ...s, limits: [{ ...s.limits[2]!, unit: 'ire' }] }))).toBe(false) // Cb in IRE
    expect(bad(s => ({ ...s, limits: [{ ...s.limits[0]!, areaTolerance: 1.5 }] }))).toBe(false)
    expect(bad(s => ({ ...s, limits: [{ ...s.limits[0]!, warningMargin: -1 }] }))).toBe(false)
    expect(bad(s => ({ ...s, limits: [{ ...s.limits[0]!, value: Number.POSITIVE_INFINITY }] }))).toBe(false)
    expect(bad(s => ({ ...s, limits: [{ ...s.limits[0]!, quantity: 'hue' }] }))).toBe(false)
  })
})

describe('verdicts', () => {
  it('legal 75 % bars pass every built-in spec', () => {
    for (const spec of BUILTIN_SPECS) {
      for (const c of [[0.75, 0.75, 0], [0, 0.75, 0.75], [0.75, 0, 0], [0, 0, 0.75], [1, 1, 1], [0, 0, 0]] as const) {
        expect(analyseFrame(solidRgb16(c[0], c[1], c[2]), { spec }).verdict).toBe('pass')
      }
    }
  })

  it('100 % yellow fails NTSC on the composite peak (+130.8 > +120 IRE), with the reason', () => {
    const a = analyseFrame(solidRgb16(1, 1, 0), { spec: builtinSpec('ntsc-setup') })
    expect(a.verdict).toBe('fail')
    expect(a.reasons).toHaveLength(1)
    const r = a.reasons[0]!
    expect(r.limit).toBe('composite-max')
    expect(r.severity).toBe('fail')
    expect(Math.abs(r.value - 130.8)).toBeLessThanOrEqual(0.05)
    expect(r.share).toBe(1)
    expect(r.message).toMatch(/130\.8 IRE/)
  })

  it('a composite peak between +115 and +120 IRE is a caution under NTSC (warning margin 5 IRE)', () => {
    // 90 % yellow: Y' = 0.9·0.886 = 0.7974, C = 0.9·0.33550/0.75 = 0.40260 → 7.5 + 92.5·1.2000 = 118.5 IRE.
    const a = analyseFrame(solidRgb16(0.9, 0.9, 0), { spec: builtinSpec('ntsc-setup') })
    expect(a.compositeIre.max).toBeCloseTo(118.5, 1)
    expect(a.verdict).toBe('caution')
    expect(a.reasons[0]).toMatchObject({ limit: 'composite-max', severity: 'caution', threshold: 115, share: 1 })
  })

  it('super-white fails the digital studio range and NTSC luma, but passes EBU R 103 within 105 %', () => {
    // Code 240 = 102.3 %: over 235 but under 246.
    const frame = uyvyRow([[240, 240, 128, 128], [100, 100, 128, 128]], 2)
    expect(analyseFrame(frame, { spec: builtinSpec('digital-studio') }).verdict).toBe('fail')
    expect(analyseFrame(frame, { spec: builtinSpec('ntsc-setup') }).reasons.map(r => r.limit)).toEqual(['luma-max'])
    expect(analyseFrame(frame, { spec: builtinSpec('ebu-r103-v3') }).verdict).toBe('pass')
    // Code 244 = 104.1 %: beyond the 103 % caution threshold over half the picture.
    const hot = uyvyRow([[244, 244, 128, 128], [100, 100, 128, 128]], 2)
    const e = analyseFrame(hot, { spec: builtinSpec('ebu-r103-v3') })
    expect(e.verdict).toBe('caution')
    expect(e.reasons[0]).toMatchObject({ limit: 'luma-max', severity: 'caution', share: 0.5 })
    expect(e.reasons[0]!.value).toBeCloseTo(100 * (244 - 16) / 219, 9)
  })

  it('studio chroma beyond 16–240 fails the digital studio range on Cb', () => {
    const a = analyseFrame(uyvyRow([[128, 128, 250, 128], [128, 128, 128, 128]], 1), { spec: builtinSpec('digital-studio') })
    expect(a.reasons.map(r => r.limit)).toEqual(['cb-max'])
    expect(a.reasons[0]!.share).toBe(0.5)
    expect(a.reasons[0]!.value).toBe(250)
  })

  it('R\'G\'B\' gamut beyond 105 % fails EBU R 103 once over 1 % of the area', () => {
    // Y 180, Cr 240: R' = 0.7489 + 1.402·0.5 = 1.4499 (145 %), far out of gamut.
    const a = analyseFrame(uyvyRow([[180, 180, 128, 240]], 1), { spec: builtinSpec('ebu-r103-v3') })
    expect(a.shares.gamutOut).toBe(1)
    expect(a.reasons.map(r => r.limit)).toEqual(['rgb-max'])
    expect(a.reasons[0]!.value).toBeCloseTo(100 * ((180 - 16) / 219 + 1.402 * 112 / 224), 1)
  })

  it('re-evaluating a stored analysis with an edited spec gives the new verdict without the pixels', () => {
    const a = analyseFrame(uyvyRow([[240, 240, 128, 128], [100, 100, 128, 128]], 2), { spec: builtinSpec('digital-studio') })
    const relaxed = structuredClone(builtinSpec('digital-studio')!) as DeliverySpec
    relaxed.limits.find(l => l.id === 'luma-max')!.areaTolerance = 0.5
    expect(evaluateSpec(a, relaxed).verdict).toBe('pass')
    relaxed.limits.find(l => l.id === 'luma-max')!.areaTolerance = 0.49
    expect(evaluateSpec(a, relaxed).verdict).toBe('fail')
  })
})

describe('gamut share', () => {
  it('counts studio-range R\'G\'B\' codes beyond 235 or below 16 (8-bit), and not the rounding of legal Y\'CbCr', () => {
    // Studio-range R'G'B': code 236 is 100.5 %, beyond the gamut; 235 is white.
    const data = new Uint8Array([236, 100, 100, 235, 235, 235, 15, 100, 100, 16, 16, 16])
    const a = analyseFrame({ kind: 'rgb', data, width: 4, height: 1, channels: 3, bitDepth: 8, range: 'studio' })
    expect(a.shares.gamutOut).toBe(0.5)
    // 100 % red coded 81/90/240 (ITU-R BT.801-1 Table 1 — memory; computed) decodes to B' = −0.0038 through rounding alone.
    expect(analyseFrame(uyvyRow([[81, 81, 90, 240]], 1)).shares.gamutOut).toBe(0)
  })
})
