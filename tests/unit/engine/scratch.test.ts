// AnalysisScratch: reused density and mask buffers must start from zero on every frame, so
// a frame analysed with a scratch equals the same frame analysed without one; so must the
// images and line data a worker thread draws into it, job after job.
import { describe, expect, it } from 'vitest'
import { AnalysisScratch, analyseFrame, PALETTE, renderMaskLayer, renderVectorscope, renderWaveform } from '../../../shared/engine/index'
import type { FrameInput, WaveformMode } from '../../../shared/engine/index'
import { encodeFrameLines } from '../../../server/lib/frame-lines'

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

  it('draws scopes, the range layer and the line data into reused buffers exactly as into new ones', () => {
    const scratch = new AnalysisScratch()
    const into = (name: string) => (n: number) => { const b = scratch.raw(name, n); return new Uint8ClampedArray(b.buffer, b.byteOffset, n) }
    const draw = (f: FrameInput) => {
      const a = analyseFrame(f, { keepDensities: true, scratch })
      const modes: WaveformMode[] = ['luma', 'flat', 'rgb']
      return {
        waves: modes.map(m => Array.from(renderWaveform(a.waveform!, m, into(`w ${m}`)).data)),
        vector: Array.from(renderVectorscope(a.vectorscope!, { out: into('v') }).data),
        layer: Array.from(renderMaskLayer(a.rangeMask!, PALETTE.overlayHigh, PALETTE.overlayLow, n => scratch.raw('o', n))),
        lines: Array.from(encodeFrameLines(f, n => scratch.raw('l', n))),
      }
    }
    const fresh = (f: FrameInput) => {
      const a = analyseFrame(f, { keepDensities: true })
      return {
        waves: (['luma', 'flat', 'rgb'] as const).map(m => Array.from(renderWaveform(a.waveform!, m).data)),
        vector: Array.from(renderVectorscope(a.vectorscope!).data),
        layer: Array.from(renderMaskLayer(a.rangeMask!, PALETTE.overlayHigh, PALETTE.overlayLow)),
        lines: Array.from(encodeFrameLines(f)),
      }
    }
    // A bright frame first (its traces and out-of-range marks fill the buffers), then a legal mid-grey one with none.
    const bright = noise(4); const grey = noise(5)
    ;(bright as { data: Uint8Array }).data.forEach((v, i, d) => { d[i] = 200 + (v % 56) })
    ;(grey as { data: Uint8Array }).data.forEach((v, i, d) => { d[i] = 100 + (v % 40) })
    draw(bright)
    const second = draw(grey)
    expect(second).toEqual(fresh(grey))
    // And the first frame's layer did mark something, so the second's clean layer is a real check.
    expect(fresh(bright).layer.some(v => v !== 0)).toBe(true)
    expect(second.layer.every(v => v === 0)).toBe(true)
  })
})
