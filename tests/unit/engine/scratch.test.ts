// AnalysisScratch: reused density and mask buffers must start from zero on every frame, so
// a frame analysed with a scratch equals the same frame analysed without one.
import { describe, expect, it } from 'vitest'
import { AnalysisScratch, analyseFrame } from '../../../shared/engine/index'
import type { FrameInput } from '../../../shared/engine/index'

function noise(seed: number, w = 200, h = 60): FrameInput {
  let s = seed
  const data = new Uint8Array(w * h * 3).map(() => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24)
  return { kind: 'rgb', data, width: w, height: h, channels: 3, bitDepth: 8, range: 'studio' }
}

describe('AnalysisScratch', () => {
  it('gives each frame clean buffers, and the same results as fresh ones', () => {
    const scratch = new AnalysisScratch()
    const a1 = analyseFrame(noise(1), { keepDensities: true, scratch })
    const lumaBuffer = a1.waveform!.luma
    const a2 = analyseFrame(noise(2), { keepDensities: true, scratch })
    expect(a2).toEqual(analyseFrame(noise(2), { keepDensities: true }))
    // The buffers are reused: the first result's densities now hold the second frame's.
    expect(a2.waveform!.luma).toBe(lumaBuffer)
    // A frame of another size gets buffers of its own size.
    const a3 = analyseFrame(noise(3, 64, 20), { keepDensities: true, scratch })
    expect(a3).toEqual(analyseFrame(noise(3, 64, 20), { keepDensities: true }))
  })
})
