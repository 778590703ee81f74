// The range mask (shared/engine/mask.ts): made in the engine's pass, on the verdict's own
// level bins, downscaled by OR-ing blocks so that a single pixel beyond a limit survives.
// Levels used: white at code 235 and black at 16 (8-bit), 940 and 64 (10-bit) — BT.601-7
// §2.5 / Table 3 (clause numbers from memory); 100 IRE white and 7.5 IRE setup on those
// codes — SMPTE 170M (memory).
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, MASK_HIGH, MASK_LOW, packV210, renderMaskLayer } from '../../../shared/engine/index'
import { analyseFrameReference } from '../../../shared/engine/analyse'
import type { DeliverySpec, FrameInput } from '../../../shared/engine/index'

const W = 1920; const H = 1080

/** A mid-grey 1080p frame with one pixel at (x, y) set to luma `hot` (8-bit code, or 10-bit for v210). */
function frame(kind: 'rgb' | 'uyvy' | 'v210', x: number, y: number, hot: number): FrameInput {
  if (kind === 'rgb') {
    // Studio-range R'G'B': code 126 everywhere is luma 126; R'=G'=B'=hot is luma hot.
    const data = new Uint8Array(W * H * 3).fill(126)
    data.fill(hot, (y * W + x) * 3, (y * W + x) * 3 + 3)
    return { kind: 'rgb', data, width: W, height: H, channels: 3, bitDepth: 8, range: 'studio' }
  }
  if (kind === 'uyvy') {
    const data = new Uint8Array(W * H * 2)
    for (let i = 0; i < W * H; i++) { data[2 * i] = 128; data[2 * i + 1] = 126 }
    data[2 * (y * W + x) + 1] = hot
    return { kind: 'uyvy', data, width: W, height: H }
  }
  const ly = new Uint16Array(W * H).fill(504); const cb = new Uint16Array(W * H / 2).fill(512); const cr = new Uint16Array(W * H / 2).fill(512)
  ly[y * W + x] = hot
  return { kind: 'v210', data: packV210(ly, cb, cr, W, H), width: W, height: H }
}

describe('range mask', () => {
  for (const [kind, high, low] of [['rgb', 250, 5], ['uyvy', 250, 5], ['v210', 1000, 20]] as const) {
    it(`one ${kind} pixel above white, or below black, marks exactly its block of the 1280-wide mask`, () => {
      for (const [value, bit] of [[high, MASK_HIGH], [low, MASK_LOW]] as const) {
        const a = analyseFrame(frame(kind, 1234, 567, value), { keepDensities: true })
        const m = a.rangeMask!
        expect([m.width, m.height]).toEqual([1280, 720])
        // Block of frame pixel (1234, 567): ⌊1234·1280/1920⌋ = 822, ⌊567·720/1080⌋ = 378.
        const at = 378 * 1280 + 822
        expect(m.data[at]).toBe(bit)
        expect(m.data.reduce((s, v) => s + (v ? 1 : 0), 0)).toBe(1)
        expect(a.verdict).toBe('fail')
      }
    })
  }

  it('at full size, marks exactly the pixels the verdict counts beyond a limit', () => {
    // Random studio-range R'G'B' against a spec with only the luma limits.
    const base = builtinSpec('ntsc-setup')!
    const spec: DeliverySpec = { ...base, limits: base.limits.filter(l => l.quantity === 'luma').map(l => ({ ...l, areaTolerance: 1 })) }
    let s = 42
    const data = new Uint8Array(300 * 200 * 3).map(() => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24)
    const input: FrameInput = { kind: 'rgb', data, width: 300, height: 200, channels: 3, bitDepth: 8, range: 'studio' }
    const a = analyseFrame(input, { spec, keepDensities: true, maskWidth: 300 })
    const n = 300 * 200
    const highs = a.rangeMask!.data.reduce((t, v) => t + (v & MASK_HIGH ? 1 : 0), 0)
    const lows = a.rangeMask!.data.reduce((t, v) => t + (v & MASK_LOW ? 1 : 0), 0)
    expect(highs).toBeGreaterThan(0)
    expect(lows).toBeGreaterThan(0)
    expect(highs / n).toBe(a.shares.aboveWhite)
    expect(lows / n).toBe(a.shares.belowBlack)
    // And the reference pass draws the same mask.
    expect(analyseFrameReference(input, { spec, keepDensities: true, maskWidth: 300 }).rangeMask!.data).toEqual(a.rangeMask!.data)
  })

  it('downscaled, a block is marked when any of its pixels is (OR of the full-size mask)', () => {
    let s = 7
    const data = new Uint8Array(301 * 97 * 3).map(() => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24 > 250 ? 255 : 120)
    const input: FrameInput = { kind: 'rgb', data, width: 301, height: 97, channels: 3, bitDepth: 8, range: 'studio' }
    const full = analyseFrame(input, { keepDensities: true, maskWidth: 301 }).rangeMask!
    const small = analyseFrame(input, { keepDensities: true, maskWidth: 64 }).rangeMask!
    expect([small.width, small.height]).toEqual([64, Math.round(97 * 64 / 301)])
    const want = new Uint8Array(small.width * small.height)
    for (let y = 0; y < 97; y++) {
      for (let x = 0; x < 301; x++) {
        const b = Math.floor(y * small.height / 97) * small.width + Math.floor(x * 64 / 301)
        want[b] = want[b]! | full.data[y * 301 + x]!
      }
    }
    expect(small.data).toEqual(want)
    expect(want.some(v => v !== 0)).toBe(true)
  })
})

describe('renderMaskLayer', () => {
  it('is transparent where nothing is marked and opaque in the mark\'s colour where a block is, above over below', () => {
    const mask = { width: 2, height: 2, data: Uint8Array.from([0, MASK_HIGH, MASK_LOW, MASK_HIGH | MASK_LOW]) }
    const out = renderMaskLayer(mask, [255, 0, 255], [0, 64, 255])
    expect([...out]).toEqual([0, 0, 0, 0, 255, 0, 255, 255, 0, 64, 255, 255, 255, 0, 255, 255])
  })
})
