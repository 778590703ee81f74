// Densities and their rendering. Geometry checks follow our own graticule definition
// (waveform.ts, render.ts); bar target positions follow the SMPTE 170M U, V equations (memory).
import { describe, expect, it } from 'vitest'
import {
  analyseFrame, barTargets, PALETTE, renderHistogram, renderVectorscope, renderWaveform,
  vectorscopeCell, WAVEFORM_IRE_BOTTOM, WAVEFORM_IRE_TOP,
} from '../../../shared/engine/index'
import type { RgbaImage } from '../../../shared/engine/index'
import { uyvyRow } from './helpers'

const px = (img: RgbaImage, x: number, y: number) => Array.from(img.data.subarray((y * img.width + x) * 4, (y * img.width + x) * 4 + 4))
const snapshot = (img: RgbaImage): RgbaImage => ({ ...img, data: img.data.slice() })
/** Index of the first byte where two images differ, −1 when they are the same (cheaper than a deep equal of a megabyte). */
const firstDiff = (a: RgbaImage, b: RgbaImage) => {
  if (a.width !== b.width || a.height !== b.height) return 0
  for (let i = 0; i < a.data.length; i++) if (a.data[i] !== b.data[i]) return i
  return -1
}

describe('waveform density', () => {
  it('puts each pixel at its IRE row in its column; flat holds both composite extremes', () => {
    // Two columns: black (7.5 IRE) and white (100 IRE), grey chroma.
    const a = analyseFrame(uyvyRow([[16, 235, 128, 128]], 3), { keepDensities: true })
    const w = a.waveform!
    expect(w.columns).toBe(2)
    const rowOf = (ire: number) => Math.floor((ire - WAVEFORM_IRE_BOTTOM) * w.rows / (WAVEFORM_IRE_TOP - WAVEFORM_IRE_BOTTOM))
    expect(w.luma[rowOf(7.5) * w.columns + 0]).toBe(3)
    expect(w.luma[rowOf(100) * w.columns + 1]).toBe(3)
    expect(w.flat[rowOf(100) * w.columns + 1]).toBe(6)
    expect(w.luma.reduce((s, v) => s + v, 0)).toBe(6)
    expect(w.flat.reduce((s, v) => s + v, 0)).toBe(12)
  })

  it('folds 1920 columns two to one', () => {
    const a = analyseFrame({ kind: 'uyvy', data: new Uint8Array(1920 * 2 * 2), width: 1920, height: 2 }, { keepDensities: true })
    expect(a.waveform!.columns).toBe(960)
    expect(a.waveform!.decimation).toBe(2)
  })

  it('renders with the graticule: the 100 IRE and 7.5 IRE lines in our key colour', () => {
    const quiet: Array<[number, number, number, number]> = Array.from({ length: 7 }, () => [16, 16, 128, 128])
    const a = analyseFrame(uyvyRow([[16, 235, 128, 128], ...quiet], 3), { keepDensities: true })
    const w = a.waveform!
    for (const mode of ['luma', 'flat', 'both', 'rgb'] as const) {
      const img = renderWaveform(w, mode)
      expect(img.height).toBe(w.rows)
      expect(img.data.length).toBe(img.width * img.height * 4)
      const y100 = w.rows - 1 - Math.floor((100 - w.ireBottom) * w.rows / (w.ireTop - w.ireBottom))
      const y75 = w.rows - 1 - Math.floor((7.5 - w.ireBottom) * w.rows / (w.ireTop - w.ireBottom))
      // Far right of the picture: graticule only at 100 IRE; at 7.5 IRE the black trace adds to it.
      expect(px(img, img.width - 1, y100)).toEqual([...PALETTE.keyLine, 255])
      expect(px(img, img.width - 1, y75)).not.toEqual([...PALETTE.background, 255])
    }
    expect(renderWaveform(w, 'rgb').width).toBeGreaterThan(renderWaveform(w, 'luma').width * 2)
  })

  it('draws each image on a fresh copy of the graticule: a trace never carries over to the next image', () => {
    // Computed: the same density must give the same image whatever was drawn before it.
    const white = analyseFrame(uyvyRow([[235, 235, 128, 128]], 4), { keepDensities: true })
    const black = analyseFrame(uyvyRow([[16, 16, 128, 128]], 4), { keepDensities: true })
    for (const mode of ['luma', 'flat', 'both', 'rgb'] as const) {
      const first = snapshot(renderWaveform(black.waveform!, mode))
      renderWaveform(white.waveform!, mode)
      expect(firstDiff(renderWaveform(black.waveform!, mode), first)).toBe(-1)
    }
    const vFirst = snapshot(renderVectorscope(black.vectorscope!))
    renderVectorscope(analyseFrame(uyvyRow([[65, 65, 100, 212]], 2), { keepDensities: true }).vectorscope!)
    expect(firstDiff(renderVectorscope(black.vectorscope!), vFirst)).toBe(-1)
  })
})

describe('vectorscope', () => {
  it('75 % bars land in the cells of their targets (SMPTE 170M U, V — memory)', () => {
    // 75 % red coded as 8-bit: 65/100/212 (ITU-R BT.801-1 Table 1 — memory).
    const a = analyseFrame(uyvyRow([[65, 65, 100, 212]], 2), { keepDensities: true })
    const v = a.vectorscope!
    const red = barTargets(0.75).find(t => t.name === 'red')!
    const { col, row } = vectorscopeCell(red.u, red.v, v.size, v.extent)
    let near = 0
    for (let dr = -1; dr <= 1; dr++) for (let dc = -1; dc <= 1; dc++) near += v.data[(row + dr) * v.size + col + dc]!
    expect(near).toBe(4)
    const img = renderVectorscope(v)
    expect(img.width).toBe(512)
    expect(img.height).toBe(512)
  })

  it('targets of the 100 % bars lie 4/3 as far out as the 75 % ones', () => {
    const t75 = barTargets(0.75); const t100 = barTargets(1)
    t75.forEach((t, i) => {
      expect(t100[i]!.u / t.u).toBeCloseTo(4 / 3, 12)
      expect(t100[i]!.v / t.v).toBeCloseTo(4 / 3, 12)
    })
  })
})

describe('histogram image', () => {
  it('histogram image marks studio black and white', () => {
    const a = analyseFrame(uyvyRow([[16, 235, 128, 128]], 2))
    const img = renderHistogram(a.histograms)
    expect(img.width).toBe(512)
    expect(px(img, Math.round(16 * 512 / 256), 0)).toEqual([...PALETTE.keyLine, 255])
  })
})
