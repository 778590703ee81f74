// The values panel's unit conversions, checked against published values: luma codes (BT.601
// Table 3 — memory for the clause), IRE with and without setup and the NTSC millivolt scale
// (SMPTE 170M / convention — memory), 10-bit codes (BT.601 Table 3), composite extremes of bars (SMPTE 170M,
// computed). The component scale (700 mV white) is common practice.
import { describe, expect, it } from 'vitest'
import { chromaCodeRows, chromaPpText, compositeValueRows, formatDifference, lumaValueRows, shareRows, specTitle } from '../../../app/utils/values-panel'

// A frame whose luma spans exactly black to white: min 16, max 235 (BT.601 Table 3), with 75 % grey (BT.801-1 Table 1: 180) as mean.
const LUMA = { min: 16, p1: 16, p10: 35, p50: 131, mean: 180, p90: 210, p99: 235, max: 235 }
const text = (rows: Array<{ key: string, text: string }>, key: string) => rows.find((r) => r.key === key)!.text
const value = (rows: Array<{ key: string, value: number }>, key: string) => rows.find((r) => r.key === key)!.value

describe('luma rows', () => {
  it('reads black and white in IRE with setup: 7.5 and 100 (SMPTE 170M — memory)', () => {
    const rows = lumaValueRows(LUMA, 'ire')
    expect(text(rows, 'min')).toBe('7.5 IRE')
    expect(text(rows, 'max')).toBe('100.0 IRE')
    // SMPTE EG 1 75 % bar table: blue's luma (code 35, BT.801-1 Table 1) is 15.4 IRE, cyan's (131) 56.1 IRE; ±0.5 IRE as tables from rounded coefficients need.
    expect(Math.abs(value(rows, 'p10') - 15.4)).toBeLessThanOrEqual(0.5)
    expect(Math.abs(value(rows, 'p50') - 56.1)).toBeLessThanOrEqual(0.5)
  })

  it('reads them as 0 and 100 IRE without setup (common practice for NTSC-J and component — memory)', () => {
    const rows = lumaValueRows(LUMA, 'ire0')
    expect(text(rows, 'min')).toBe('0.0 IRE')
    expect(text(rows, 'max')).toBe('100.0 IRE')
    // computed: 100 × (180 − 16)/219 = 74.886…
    expect(text(rows, 'mean')).toBe('74.9 IRE')
  })

  it('reads them as codes 16 / 235 and 64 / 940 (ITU-R BT.601-7 Table 3 — memory)', () => {
    expect(text(lumaValueRows(LUMA, 'code8'), 'min')).toBe('16')
    expect(text(lumaValueRows(LUMA, 'code8'), 'max')).toBe('235')
    expect(text(lumaValueRows(LUMA, 'code10'), 'min')).toBe('64')
    expect(text(lumaValueRows(LUMA, 'code10'), 'max')).toBe('940')
  })

  it('reads them in millivolts and percent', () => {
    // common practice: component analogue, black 0 mV, white 700 mV.
    expect(text(lumaValueRows(LUMA, 'mv'), 'max')).toBe('700 mV')
    expect(text(lumaValueRows(LUMA, 'mv'), 'min')).toBe('0 mV')
    // SMPTE 170M (memory): 1 IRE = 7.143 mV, so white 100 IRE = 714 mV and black 7.5 IRE = 54 mV (53.6).
    expect(text(lumaValueRows(LUMA, 'mvNtsc'), 'max')).toBe('714 mV')
    expect(text(lumaValueRows(LUMA, 'mvNtsc'), 'min')).toBe('54 mV')
    expect(text(lumaValueRows(LUMA, 'pct'), 'max')).toBe('100.0 %')
  })

  it('keeps the order a person reads: min, percentiles, mean, max', () => {
    expect(lumaValueRows(LUMA, 'ire').map((r) => r.key)).toEqual(['min', 'p1', 'p10', 'p50', 'mean', 'p90', 'p99', 'max'])
  })
})

describe('composite rows', () => {
  // SMPTE EG 1 bars (memory; computed from the SMPTE 170M equations): extremes of 100 % bars +130.8 / −23.3 IRE with setup.
  const comp = { min: -23.3, max: 130.8 }

  it('shows the composite extremes as given, in IRE with setup', () => {
    const rows = compositeValueRows(comp, 'ire')
    expect(text(rows, 'composite-max')).toBe('130.8 IRE')
    expect(text(rows, 'composite-min')).toBe('-23.3 IRE')
  })

  it('carries them to the other scales through the luma code', () => {
    // computed from SMPTE 170M: code = 16 + (IRE − 7.5) × 219/92.5; 130.8 IRE → 307.93 → 1231.7 at 10 bits.
    expect(value(compositeValueRows(comp, 'code8'), 'composite-max')).toBeCloseTo(16 + (130.8 - 7.5) * 219 / 92.5, 9)
    expect(text(compositeValueRows(comp, 'code10'), 'composite-max')).toBe('1232')
    // computed: without setup (130.8 − 7.5)/0.925 = 133.3 IRE; NTSC mV 130.8 × 1000/140 = 934 mV (SMPTE 170M — memory).
    expect(text(compositeValueRows(comp, 'ire0'), 'composite-max')).toBe('133.3 IRE')
    expect(text(compositeValueRows(comp, 'mvNtsc'), 'composite-max')).toBe('934 mV')
    // blanking (0 IRE) is 0 mV on the NTSC scale (SMPTE 170M).
    expect(text(compositeValueRows({ min: 0, max: 0 }, 'mvNtsc'), 'composite-min')).toBe('0 mV')
  })
})

describe('chroma rows', () => {
  // ITU-R BT.801-1 Table 1 (memory; computed from BT.601): 75 % yellow Cb 44 / Cr 142 (8-bit) and blue Cb 212 / Cr 114.
  const chroma = { cbMin: 44, cbMax: 212, crMin: 114, crMax: 142, ppMaxIre: 62.1 }

  it('gives Cb and Cr as 8-bit codes, and at 10 bits when that scale is chosen', () => {
    expect(chromaCodeRows(chroma, 'ire').map((r) => r.text)).toEqual(['44', '212', '114', '142'])
    expect(chromaCodeRows(chroma, 'mv').map((r) => r.text)).toEqual(['44', '212', '114', '142'])
    // BT.601 Table 3: 10-bit is the 8-bit range × 4 (176 is BT.801-1's 10-bit yellow Cb).
    expect(chromaCodeRows(chroma, 'code10')[0]!.text).toBe('176')
  })

  it('keeps chroma p-p in IRE (SMPTE EG 1 bar table: 75 % yellow 62.1 IRE p-p)', () => {
    expect(chromaPpText(62.1)).toBe('62.1 IRE')
  })
})

describe('shares and differences', () => {
  it('gives every share as a percentage', () => {
    const rows = shareRows({ belowBlack: 0, aboveWhite: 0.125, compositeOut: 0.004, gamutOut: 0.00001, clipped: 0.5, crushed: 0, studioOut: 0.02 })
    expect(text(rows, 'aboveWhite')).toBe('12.50 %')
    expect(text(rows, 'compositeOut')).toBe('0.400 %')
    expect(text(rows, 'gamutOut')).toBe('1.0e-3 %')
    expect(text(rows, 'belowBlack')).toBe('0 %')
    expect(rows).toHaveLength(7)
  })

  it('signs a difference and names its unit', () => {
    // computed (SMPTE 170M): 4 codes of luma are 92.5 × 4/219 = 1.69 IRE with setup.
    expect(formatDifference(92.5 * 4 / 219, 'ire')).toBe('+1.7 IRE')
    expect(formatDifference(-4, 'code8')).toBe('−4 codes')
    expect(formatDifference(-16, 'code10')).toBe('−16 codes (10-bit)')
    expect(formatDifference(0.01, 'ire')).toBe('±0.0 IRE')
    expect(formatDifference(-35.2, 'mv')).toBe('−35 mV')
  })

  it('names a built-in spec by its title and a team spec by its own name', () => {
    expect(specTitle('ntsc-setup')).toBe('NTSC broadcast with setup')
    expect(specTitle('house-spec')).toBe('house-spec')
  })
})
