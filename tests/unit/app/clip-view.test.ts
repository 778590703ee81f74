// The clip panel's pure helpers. IRE figures: IRE = 7.5 + 92.5·(Y − 16)/219 on the 8-bit
// code scale (SMPTE 170M convention as in Jack and Poynton — memory; computed below).
import { describe, expect, it } from 'vitest'
import { emptyTimeline } from '../../../shared/utils/clip-timeline'
import { clipSeries, stepEvent } from '../../../app/utils/clip-view'

describe('clipSeries', () => {
  it('keeps a one-frame excursion when thinning a long timeline', () => {
    const t = emptyTimeline(10_000)
    for (const c of ['lumaMin', 'lumaMax', 'lumaMean', 'compMin', 'compMax'] as const) t.columns[c].fill(126)
    t.columns.lumaMax[7_777] = 250 // one super-white frame
    const s = clipSeries(t, 100)
    expect(s.x.length).toBe(100)
    // 250 → 7.5 + 92.5 × 234/219 = 106.3 IRE; 126 → 7.5 + 92.5 × 110/219 = 53.96 → 54.0 (computed).
    expect(Math.max(...s.lumaMax)).toBe(106.3)
    expect(s.lumaMax.filter((v) => v === 106.3)).toHaveLength(1)
    expect(s.lumaMean[0]).toBe(54)
  })
})

describe('stepEvent', () => {
  it('walks events forwards and backwards and stops at the ends', () => {
    expect(stepEvent(3, -1, 1)).toBe(0)
    expect(stepEvent(3, -1, -1)).toBe(2)
    expect(stepEvent(3, 1, 1)).toBe(2)
    expect(stepEvent(3, 2, 1)).toBeNull()
    expect(stepEvent(3, 0, -1)).toBeNull()
    expect(stepEvent(0, -1, 1)).toBeNull()
  })
})
