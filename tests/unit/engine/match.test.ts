// Source matching: a reference and three sources with known line-up offsets, each built from
// the BT.801 75 % split field (tests/support/bars.ts) with errors applied in the composite U/V
// plane; the matching table must report the offsets put in.
import { describe, expect, it } from 'vitest'
import { DEFAULT_BARS_TOLERANCES, matchBars, measureBars } from '../../../shared/engine/index'
import { applyErrors, exactColour, splitFieldPatches, v210Frame } from '../../support/bars'
import type { LineupErrors } from '../../support/bars'

const bars = (e: LineupErrors) => measureBars(v210Frame(splitFieldPatches(exactColour(0.75, '601', e), y => applyErrors(y, e, '601')), 720, 486))

describe('matching three sources against a reference', () => {
  // The reference itself is a little off (hue +1°, chroma 102 %): matching is relative to it.
  const ref = bars({ hueDeg: 1, chromaGain: 1.02 })
  const camB = bars({ hueDeg: 4, chromaGain: 1.02 * 0.96, blackOffsetIre: 2.1 })
  const camC = bars({ hueDeg: 1, chromaGain: 1.02, lumaGain: 0.97 })
  const camD = bars({ hueDeg: 1.5, chromaGain: 1.02 * 1.01 })

  it('camera B: +2.1 IRE, chroma −4 %, hue +3.0° against the reference', () => {
    const m = matchBars(ref, camB, DEFAULT_BARS_TOLERANCES)!
    expect(Math.abs(m.levelOffsetIre - 2.1)).toBeLessThan(0.2)
    expect(Math.abs(m.chromaGainPct - -4)).toBeLessThan(0.2)
    expect(Math.abs(m.hueOffsetDeg - 3)).toBeLessThan(0.3)
    expect(Math.abs(m.gainRatio - 1)).toBeLessThan(0.002)
    expect(m.summary).toBe('+2.1 IRE, gain ×1.000, chroma −4 %, hue +3.0°')
    expect(m.verdict).toBe('fail')
    expect(m.reasons.map(r => r.check)).toEqual(['level', 'chroma', 'hue'])
  })

  it('camera C: luma gain ratio 0.97', () => {
    const m = matchBars(ref, camC, DEFAULT_BARS_TOLERANCES)!
    expect(Math.abs(m.gainRatio - 0.97)).toBeLessThan(0.002)
    expect(Math.abs(m.levelOffsetIre)).toBeLessThan(0.2)
    expect(Math.abs(m.hueOffsetDeg)).toBeLessThan(0.3)
    expect(m.reasons.map(r => r.check)).toEqual(['gain'])
  })

  it('camera D within tolerance: +1 % chroma, +0.5° hue passes', () => {
    const m = matchBars(ref, camD, DEFAULT_BARS_TOLERANCES)!
    expect(Math.abs(m.chromaGainPct - 1)).toBeLessThan(0.2)
    expect(Math.abs(m.hueOffsetDeg - 0.5)).toBeLessThan(0.3)
    expect(m.verdict).toBe('pass')
  })

  it('a frame that is not bars has no match', () => {
    const notBars = measureBars({ kind: 'uyvy', data: new Uint8Array(720 * 486 * 2).fill(128), width: 720, height: 486 })
    expect(matchBars(ref, notBars, DEFAULT_BARS_TOLERANCES)).toBeNull()
  })
})
