// The frames table's unit switch. Sources: SMPTE 170M convention — memory (IRE = 7.5 + 92.5·(Y − 16)/219,
// without setup 100·(Y − 16)/219, 1 IRE = 1/140 V = 7.143 mV), BT.601 Table 3 (8-bit white 235, black 16;
// 10-bit white 940, black 64 — BT.601 Table 3), and the component convention of
// shared/engine/scales.ts (black 0 mV, white 700 mV — common practice).
import { describe, expect, it } from 'vitest'
import { compositeScale, formatIreAs, formatOutShare, ireToScale } from '../../../app/utils/level-units'

describe('stored IRE (7.5 setup) on the other scales', () => {
  it('white: 100 IRE is code 235, 940 at 10 bits, 700 mV, 100 %, 100 IRE without setup (BT.601 Table 3, SMPTE 170M)', () => {
    expect(ireToScale(100, 'code8')).toBeCloseTo(235, 10)
    expect(ireToScale(100, 'code10')).toBeCloseTo(940, 10)
    expect(ireToScale(100, 'mv')).toBeCloseTo(700, 10)
    expect(ireToScale(100, 'pct')).toBeCloseTo(100, 10)
    expect(ireToScale(100, 'ire0')).toBeCloseTo(100, 10)
    // 100 IRE × 1000/140 mV = 714.29 mV (SMPTE 170M).
    expect(ireToScale(100, 'mvNtsc')).toBeCloseTo(714.2857, 3)
    expect(ireToScale(100, 'ire')).toBeCloseTo(100, 10)
  })

  it('black: 7.5 IRE is code 16, 64 at 10 bits, 0 mV, 0 %, 0 IRE without setup, 53.6 NTSC mV (BT.601 Table 3, SMPTE 170M)', () => {
    expect(ireToScale(7.5, 'code8')).toBeCloseTo(16, 10)
    expect(ireToScale(7.5, 'code10')).toBeCloseTo(64, 10)
    expect(ireToScale(7.5, 'mv')).toBeCloseTo(0, 10)
    expect(ireToScale(7.5, 'pct')).toBeCloseTo(0, 10)
    expect(ireToScale(7.5, 'ire0')).toBeCloseTo(0, 10)
    expect(ireToScale(7.5, 'mvNtsc')).toBeCloseTo(53.57, 2)
  })

  it('mid grey: 50 IRE is code 16 + 42.5·219/92.5 = 116.62 (computed from SMPTE 170M)', () => {
    expect(ireToScale(50, 'code8')).toBeCloseTo(116.6216, 3)
    // 42.5/92.5 of the span: 45.95 % and 321.6 mV.
    expect(ireToScale(50, 'pct')).toBeCloseTo(45.9459, 3)
    expect(ireToScale(50, 'mv')).toBeCloseTo(321.6216, 3)
  })

  it('composite limits of the NTSC spec: +120 IRE is 121.6 IRE without setup and 857.1 NTSC mV; −20 IRE is −29.7 (computed from SMPTE 170M)', () => {
    // (120 − 7.5)/92.5 × 100 = 121.62; 120 × 1000/140 = 857.14; (−20 − 7.5)/92.5 × 100 = −29.73.
    expect(ireToScale(120, 'ire0')).toBeCloseTo(121.6216, 3)
    expect(ireToScale(120, 'mvNtsc')).toBeCloseTo(857.1429, 3)
    expect(ireToScale(-20, 'ire0')).toBeCloseTo(-29.7297, 3)
  })
})

describe('table cells', () => {
  it('uses the digits of each scale: one decimal for IRE and %, whole mV and codes', () => {
    expect(formatIreAs(100, 'ire')).toBe('100.0')
    expect(formatIreAs(100, 'mv')).toBe('700')
    expect(formatIreAs(100, 'code8')).toBe('235')
    expect(formatIreAs(100, 'code10')).toBe('940')
    expect(formatIreAs(50, 'pct')).toBe('45.9')
    // 104.3 IRE: code 16 + 96.8·219/92.5 = 245.18 → 245 (super-white).
    expect(formatIreAs(104.3, 'code8')).toBe('245')
  })

  it('never shows "-0.0" for a level just under black, and a dash for a frame not measured yet', () => {
    expect(formatIreAs(7.49, 'ire0')).toBe('0.0')
    expect(formatIreAs(7.4, 'ire0')).toBe('-0.1')
    expect(formatIreAs(null, 'ire')).toBe('—')
    expect(formatIreAs(undefined, 'mv')).toBe('—')
    expect(formatIreAs(Number.NaN, 'ire')).toBe('—')
  })

  it('keeps composite in IRE where the scale has no composite meaning (codes, component mV)', () => {
    expect(compositeScale('code8')).toBe('ire')
    expect(compositeScale('code10')).toBe('ire')
    expect(compositeScale('mv')).toBe('ire')
    expect(compositeScale('ire')).toBe('ire')
    expect(compositeScale('ire0')).toBe('ire0')
    expect(compositeScale('pct')).toBe('pct')
    expect(compositeScale('mvNtsc')).toBe('mvNtsc')
  })

  it('shows the out-of-range share as a percentage', () => {
    expect(formatOutShare(0)).toBe('0 %')
    expect(formatOutShare(0.0123)).toBe('1.23 %')
    expect(formatOutShare(0.0005)).toBe('0.050 %')
    expect(formatOutShare(null)).toBe('—')
  })
})
