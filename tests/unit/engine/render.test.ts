// Densities and their rendering. Geometry checks follow our own graticule definition
// (waveform.ts, render.ts); bar target positions follow REFERENCE.md §4 (U, V equations).
import { describe, expect, it } from 'vitest'
import {
  analyseFrame, barTargets, builtinSpec, PALETTE, renderHistogram, renderRangeOverlay, renderVectorscope, renderWaveform,
  vectorscopeCell, WAVEFORM_IRE_BOTTOM, WAVEFORM_IRE_TOP,
} from '../../../shared/engine/index'
import type { FrameInput, RgbaImage } from '../../../shared/engine/index'
import { solidRgb8, uyvyRow } from './helpers'

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
  it('75 % bars land in the cells of their targets (REFERENCE.md §4 U, V)', () => {
    // 75 % red coded as 8-bit: 65/100/212 (REFERENCE.md §3).
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

describe('range overlay and histogram images', () => {
  it('paints levels above a limit in one colour, below in another, and shows the rest as the picture', () => {
    const frame = uyvyRow([[250, 126, 128, 128], [8, 235, 128, 128]], 1)
    const img = renderRangeOverlay(frame, builtinSpec('digital-studio')!)
    expect(img.width).toBe(4)
    expect(px(img, 0, 0)).toEqual([...PALETTE.overlayHigh, 255])
    expect(px(img, 2, 0)).toEqual([...PALETTE.overlayLow, 255])
    // Code 126 is grey at (126 − 16)/219 = 0.5023 → 128; code 235 is white, exactly at the limit.
    expect(px(img, 1, 0)).toEqual([128, 128, 128, 255])
    expect(px(img, 3, 0)).toEqual([255, 255, 255, 255])
  })

  it('drawn smaller, marks a block if any one of its pixels is beyond a limit: a lone hot pixel in 1080p stays visible', () => {
    // A studio-range grey frame (code 126) with one super-white pixel (code 250 > white 235)
    // and one sub-black pixel (code 8 < black 16): BT.601 Table 3 (REFERENCE.md §1).
    const W = 1920; const H = 1080
    const frame = solidRgb8(126, 126, 126, W, H, 'studio')
    const put = (x: number, y: number, code: number) => (frame as Extract<FrameInput, { kind: 'rgb' }>).data.fill(code, (y * W + x) * 3, (y * W + x) * 3 + 3)
    put(1000, 532, 250)
    put(7, 1079, 8)
    const spec = builtinSpec('digital-studio')!
    // The verdict on the same pixels: one pixel in 1920×1080 above white, one below black.
    const a = analyseFrame(frame, { spec })
    expect(a.shares.aboveWhite).toBeCloseTo(1 / (W * H), 12)
    expect(a.shares.belowBlack).toBeCloseTo(1 / (W * H), 12)
    expect(a.reasons.map(r => r.limit).sort()).toEqual(['luma-max', 'luma-min'])

    const img = renderRangeOverlay(frame, spec, { maxWidth: 1280, withPicture: true })
    expect([img.width, img.height]).toEqual([1280, 720])
    // Computed: frame column x lands in image column ⌊x·1280/1920⌋, row y in ⌊y·720/1080⌋, so
    // (1000, 532) is in block (666, 354) with columns 999–1000 and rows 531–532, and (7, 1079)
    // in block (4, 719) with columns 6–7 and row 1079 alone.
    expect(px(img, 666, 354)).toEqual([...PALETTE.overlayHigh, 255])
    expect(px(img, 4, 719)).toEqual([...PALETTE.overlayLow, 255])
    const differs = (i: number) => [0, 1, 2].some(c => img.data[i * 4 + c] !== img.picture!.data[i * 3 + c])
    let marked = 0
    for (let i = 0; i < img.width * img.height; i++) if (differs(i)) marked++
    expect(marked).toBe(2)
    // Elsewhere the picture: code 126 is (126 − 16)/219 = 0.50228 → 128.08 → 128 for display.
    expect(px(img, 0, 0)).toEqual([128, 128, 128, 255])
    // The unmarked picture averages each block, every pixel clipped for display first:
    // (3 · 128.08 + 255) / 4 = 159.81 → 160 (code 250 shows as white), (128.08 + 0) / 2 = 64.04 → 64.
    const pic = (x: number, y: number) => Array.from(img.picture!.data.subarray((y * 1280 + x) * 3, (y * 1280 + x) * 3 + 3))
    expect(pic(666, 354)).toEqual([160, 160, 160])
    expect(pic(4, 719)).toEqual([64, 64, 64])
  })

  it('takes the marks from a mask when one is given, and reads the frame for the picture only', () => {
    const W = 1920; const H = 1080
    const frame = solidRgb8(126, 126, 126, W, H, 'studio')
    ;(frame as Extract<FrameInput, { kind: 'rgb' }>).data.fill(250, (532 * W + 1000) * 3, (532 * W + 1000) * 3 + 3)
    ;(frame as Extract<FrameInput, { kind: 'rgb' }>).data.fill(8, (1079 * W + 7) * 3, (1079 * W + 7) * 3 + 3)
    const spec = builtinSpec('digital-studio')!
    const own = renderRangeOverlay(frame, spec, { maxWidth: 1280 })
    // A mask of exactly the blocks the overlay marked itself (computed) gives the same image.
    const same = new Uint8Array(1280 * 720)
    for (let i = 0; i < same.length; i++) {
      const c = [own.data[i * 4], own.data[i * 4 + 1], own.data[i * 4 + 2]]
      same[i] = c.every((v, k) => v === PALETTE.overlayHigh[k]) ? 1 : c.every((v, k) => v === PALETTE.overlayLow[k]) ? 2 : 0
    }
    expect(same.reduce((n, v) => n + (v ? 1 : 0), 0)).toBe(2)
    expect(firstDiff(renderRangeOverlay(frame, spec, { maxWidth: 1280, mask: { width: 1280, height: 720, data: same } }), own)).toBe(-1)
    // The mask is used as given: its block is marked, the hot pixel's block is not.
    const other = new Uint8Array(1280 * 720)
    other[10 * 1280 + 20] = 2
    const img = renderRangeOverlay(frame, spec, { maxWidth: 1280, mask: { width: 1280, height: 720, data: other } })
    expect(px(img, 20, 10)).toEqual([...PALETTE.overlayLow, 255])
    expect(px(img, 666, 354)).toEqual([160, 160, 160, 255])
    expect(() => renderRangeOverlay(frame, spec, { maxWidth: 1280, mask: { width: 1280, height: 719, data: other } })).toThrow(/1280×719/)
  })

  it('averages the picture over each block and keeps the full size when the frame is narrow enough', () => {
    // Full-range grey codes 100 and 201 side by side: the 2×2 blocks average to 150.5 → 150 (round half to even, as a Uint8ClampedArray stores).
    const frame = solidRgb8(0, 0, 0, 4, 2)
    const d = (frame as Extract<FrameInput, { kind: 'rgb' }>).data
    for (let y = 0; y < 2; y++) for (let x = 0; x < 4; x++) d.fill(x % 2 ? 201 : 100, (y * 4 + x) * 3, (y * 4 + x) * 3 + 3)
    const spec = builtinSpec('ebu-r103-v3')!
    const small = renderRangeOverlay(frame, spec, { maxWidth: 2 })
    expect([small.width, small.height]).toEqual([2, 1])
    expect(px(small, 0, 0)).toEqual([150, 150, 150, 255])
    expect(px(small, 1, 0)).toEqual([150, 150, 150, 255])
    const full = renderRangeOverlay(frame, spec, { maxWidth: 1280 })
    expect(full.data).toEqual(renderRangeOverlay(frame, spec).data)
    expect(px(full, 1, 1)).toEqual([201, 201, 201, 255])
  })

  it('histogram image marks studio black and white', () => {
    const a = analyseFrame(uyvyRow([[16, 235, 128, 128]], 2))
    const img = renderHistogram(a.histograms)
    expect(img.width).toBe(512)
    expect(px(img, Math.round(16 * 512 / 256), 0)).toEqual([...PALETTE.keyLine, 255])
  })
})
