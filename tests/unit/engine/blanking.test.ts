// Blanking estimate of full-raster SD captures.
// Sources: BT.601 sampling at 13.5 MHz, 858 samples a line, 720 active (ITU-R BT.601-7, clause
// numbers from memory); line rate 15 734.264 Hz (FCC 47 CFR §73.682, read); horizontal blanking
// 10.9 ± 0.2 µs and at most 21 lines of vertical blanking per field (SMPTE 170M, memory).
import { describe, expect, it } from 'vitest'
import { measureBlanking, NTSC_LINE_US, samplesToUs, usToSamples, packV210 } from '../../../shared/engine/index'
import type { FrameInput } from '../../../shared/engine/index'

describe('µs ↔ samples at 13.5 MHz (BT.601)', () => {
  it('858 samples are one NTSC line, 720 samples 53.333 µs', () => {
    // 858 / 13.5 MHz = 63.5556 µs; 1 / 15 734.264 Hz = 63.5556 µs (computed).
    expect(samplesToUs(858)).toBeCloseTo(63.5556, 4)
    expect(NTSC_LINE_US).toBeCloseTo(63.5556, 4)
    expect(Math.abs(samplesToUs(858) - NTSC_LINE_US)).toBeLessThan(1e-4)
    expect(samplesToUs(720)).toBeCloseTo(53.3333, 4)
    // 10.9 µs of blanking leaves 52.656 µs = 710.85 samples of picture (computed).
    expect(usToSamples(NTSC_LINE_US - 10.9)).toBeCloseTo(710.85, 2)
    expect(usToSamples(samplesToUs(123.4))).toBeCloseTo(123.4, 10)
  })
})

// Where the analogue picture sits in the digital line (SMPTE 170M and BT.601 timing, memory):
// 0H lies 16 samples after the last of the 720 active samples, and the front porch puts the end
// of the picture 1.5 µs before 0H, so the picture ends at 720 + 16 − 1.5·13.5 = 715.75 samples
// and starts (63.556 − H blanking)·13.5 samples before that.
const PICTURE_END = 720 + 16 - usToSamples(1.5)

/**
 * A raster with `hUs` of horizontal blanking placed as above, and `top`/`bottom` blank rows;
 * the picture's edge samples carry the share of the sample the picture covers.
 */
function raster(hUs: number, height: number, top: number, bottom: number, kind: 'uyvy' | 'v210' = 'uyvy', edges?: [number, number]): FrameInput {
  const W = 720
  const active = usToSamples(NTSC_LINE_US - hUs)
  const [left, right] = edges ?? [PICTURE_END - active, PICTURE_END]
  const yLine = new Float64Array(W)
  for (let x = 0; x < W; x++) {
    const cover = Math.max(0, Math.min(x + 1, right) - Math.max(x, left))
    // Picture: a luma ramp 60..200 so the edges are not at one level (8-bit codes).
    const pic = 60 + 140 * x / W
    yLine[x] = 16 + (pic - 16) * cover
  }
  const y = new Uint16Array(W * height); const cb = new Uint16Array(W / 2 * height); const cr = new Uint16Array(W / 2 * height)
  const k = kind === 'v210' ? 4 : 1
  for (let r = 0; r < height; r++) {
    const blank = r < top || r >= height - bottom
    for (let x = 0; x < W; x++) y[r * W + x] = Math.round((blank ? 16 : yLine[x]!) * k)
    for (let c = 0; c < W / 2; c++) { cb[r * W / 2 + c] = 128 * k; cr[r * W / 2 + c] = 128 * k }
  }
  if (kind === 'v210') return { kind, data: packV210(y, cb, cr, W, height), width: W, height }
  const data = new Uint8Array(W * height * 2)
  for (let i = 0; i < W * height; i += 2) {
    data[i * 2] = cb[i / 2]!; data[i * 2 + 1] = y[i]!; data[i * 2 + 2] = cr[i / 2]!; data[i * 2 + 3] = y[i + 1]!
  }
  return { kind, data, width: W, height }
}

describe('blanking of synthetic SD rasters with known edges', () => {
  it('10.9 µs, 486 lines with 9 blank rows (24 lines a field): width within 0.1 µs, lines exact, H passes, V fails', () => {
    for (const kind of ['uyvy', 'v210'] as const) {
      const r = measureBlanking(raster(10.9, 486, 5, 4, kind))
      expect(r.applicable).toBe(true)
      expect(r.hBlankingExact).toBe(true)
      expect(Math.abs(r.hBlankingUs! - 10.9), kind).toBeLessThan(0.1)
      // (525 − 477) / 2 = 24 lines a field (computed).
      expect(r.activeLines).toBe(477)
      expect(r.firstActiveLine).toBe(5)
      expect(r.lastActiveLine).toBe(481)
      expect(r.vBlankingLinesPerField).toBe(24)
      expect(r.verdict).toBe('fail')
      expect(r.reasons.map(x => x.check)).toEqual(['v-blanking'])
      // Edges per line, in samples: the picture starts at 715.75 − 710.85 = 4.90 (computed).
      expect(PICTURE_END).toBeCloseTo(715.75, 6)
      expect(r.leftEdges[100]).toBeCloseTo(4.9, 1)
      expect(r.rightEdges[100]).toBeCloseTo(715.75, 1)
      expect(r.leftEdges[0]).toBeNull()
    }
  })

  it('11.5 µs on a full 487-line raster (19 lines a field): the picture is too narrow', () => {
    const r = measureBlanking(raster(11.5, 487, 0, 0))
    expect(Math.abs(r.hBlankingUs! - 11.5)).toBeLessThan(0.1)
    expect(r.vBlankingLinesPerField).toBe(19)
    expect(r.verdict).toBe('fail')
    expect(r.reasons.map(x => x.check)).toEqual(['h-blanking'])
    expect(r.reasons[0]!.message).toMatch(/too narrow/)
  })

  it('10.9 µs with 19 lines passes', () => {
    const r = measureBlanking(raster(10.9, 487, 0, 0))
    expect(r.verdict).toBe('pass')
  })

  it('9.8 µs: the picture starts before the digital line does, so the width is an upper bound, and fails', () => {
    // 63.556 − 9.8 = 53.756 µs = 725.7 samples, ending at 715.75: it would start at −9.96, before
    // sample 0. What is seen is 715.75 samples = 53.02 µs of picture, so H blanking ≤ 10.54 µs (computed).
    const r = measureBlanking(raster(9.8, 486, 0, 0))
    expect(r.leftHidden).toBe(true)
    expect(r.hBlankingExact).toBe(false)
    expect(r.hBlankingUs).toBeCloseTo(NTSC_LINE_US - 715.75 / 13.5, 1)
    expect(r.verdict).toBe('fail')
    expect(r.reasons[0]!.message).toMatch(/at most 10\.5\d µs.*too wide/)
  })

  it('a picture made digitally (no blanking on either side) is not judged on H blanking', () => {
    const r = measureBlanking(raster(0, 486, 0, 0, 'uyvy', [0, 720]))
    expect(r.leftHidden && r.rightHidden).toBe(true)
    expect(r.verdict).toBe('unknown')
    expect(r.reasons).toEqual([])
    expect(r.vBlankingLinesPerField).toBe(19.5)
  })

  it('frames that are not full-raster SD are not estimated', () => {
    const r = measureBlanking({ kind: 'uyvy', data: new Uint8Array(1920 * 1080 * 2), width: 1920, height: 1080 })
    expect(r.applicable).toBe(false)
    expect(r.verdict).toBeNull()
    expect(r.notes[0]).toMatch(/720 × 486 or 487/)
  })
})
