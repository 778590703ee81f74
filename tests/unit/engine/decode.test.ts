// UYVY and v210 unpacking with hand-built byte patterns. Layouts: UYVY = Cb Y0 Cr Y1 per pixel
// pair (8-bit 4:2:2, common practice); v210 = three 10-bit samples in bits 0–9, 10–19, 20–29 of
// little-endian 32-bit words, word order Cb0 Y0 Cr0 | Y1 Cb1 Y2 | Cr1 Y3 Cb2 | Y4 Cr2 Y5, rows
// padded to 128 bytes (common practice; ffmpeg's v210 codec agrees, see ffmpeg.test.ts).
import { describe, expect, it } from 'vitest'
import { analyseFrame, EngineInputError, linePlot, makeRowBuffers, makeRowSource, packV210, v210Stride } from '../../../shared/engine/index'
import { uyvyRow } from './helpers'

function word(a: number, b: number, c: number): number[] {
  const w = (a | (b << 10) | (c << 20)) >>> 0
  return [w & 255, (w >>> 8) & 255, (w >>> 16) & 255, (w >>> 24) & 255]
}

describe('UYVY', () => {
  it('places Cb, Y0, Cr, Y1 and holds chroma over the pair', () => {
    const input = uyvyRow([[16, 235, 90, 240], [254, 1, 16, 128]], 1)
    const src = makeRowSource(input, '601')
    const row = makeRowBuffers(4)
    src.readRow(0, row)
    expect(Array.from(row.y)).toEqual([16, 235, 254, 1])
    expect(Array.from(row.pb).map(p => 128 + 224 * p)).toEqual([90, 90, 16, 16])
    expect(Array.from(row.pr).map(p => 128 + 224 * p)).toEqual([240, 240, 128, 128])
  })

  it('keeps super-white and sub-black codes (1…254) instead of clipping them', () => {
    const a = analyseFrame(uyvyRow([[1, 254, 128, 128], [16, 235, 128, 128]], 1))
    expect(a.luma.min).toBe(1)
    expect(a.luma.max).toBe(254)
    expect(a.shares.belowBlack).toBeCloseTo(0.25, 12)
    expect(a.shares.aboveWhite).toBeCloseTo(0.25, 12)
    // Code 254 is the top a Y'CbCr source can carry (255 is reserved, BT.601 Table 3): clipped.
    expect(a.shares.clipped).toBeCloseTo(0.25, 12)
    expect(a.shares.crushed).toBeCloseTo(0.25, 12)
  })

  it('refuses odd widths and short data with a clear message', () => {
    expect(() => analyseFrame({ kind: 'uyvy', data: new Uint8Array(6), width: 3, height: 1 })).toThrow(EngineInputError)
    expect(() => analyseFrame({ kind: 'uyvy', data: new Uint8Array(6), width: 4, height: 1 })).toThrow(/UYVY data: 6 bytes or samples, 8 needed/)
  })
})

describe('v210', () => {
  it('row stride is 128 bytes per 48 pixels, rounded up', () => {
    expect(v210Stride(720)).toBe(1920)
    expect(v210Stride(1920)).toBe(5120)
    expect(v210Stride(6)).toBe(128)
  })

  it('unpacks a hand-built group of six pixels, super-white 1000 and sub-black 40 kept', () => {
    // Y 1000 (super-white: above 940) and 40 (sub-black: below 64) must survive untouched.
    const Y = [1000, 40, 64, 940, 512, 1019]
    const Cb = [100, 512, 960]
    const Cr = [900, 64, 512]
    const bytes = new Uint8Array(128)
    bytes.set([
      ...word(Cb[0]!, Y[0]!, Cr[0]!), ...word(Y[1]!, Cb[1]!, Y[2]!),
      ...word(Cr[1]!, Y[3]!, Cb[2]!), ...word(Y[4]!, Cr[2]!, Y[5]!),
    ])
    const src = makeRowSource({ kind: 'v210', data: bytes, width: 6, height: 1 }, '601')
    const row = makeRowBuffers(6)
    src.readRow(0, row)
    expect(Array.from(row.y).map(v => v * 4)).toEqual(Y)
    expect(Array.from(row.pb).map(p => Math.round(512 + 896 * p))).toEqual([100, 100, 512, 512, 960, 960])
    expect(Array.from(row.pr).map(p => Math.round(512 + 896 * p))).toEqual([900, 900, 64, 64, 512, 512])
    // Our packer writes the same bytes as the hand-built words.
    expect(packV210(Y, Cb, Cr, 6, 1)).toEqual(bytes)

    const a = analyseFrame({ kind: 'v210', data: bytes, width: 6, height: 1 })
    expect(a.luma.max).toBe(1019 / 4)
    expect(a.luma.min).toBe(10) // 40 / 4
    expect(a.luma.p50).toBe(128) // nearest rank ⌈0.5·6⌉ = 3rd of 40, 64, 512, … → 512 / 4
    expect(a.lumaIre.max).toBeCloseTo(7.5 + 92.5 * (1019 - 64) / 876, 9) // 108.3 IRE
    expect(a.histograms.bins).toBe(1024)
    expect(a.histograms.y[1000]).toBe(1)
    expect(a.histograms.y[40]).toBe(1)
    expect(a.shares.aboveWhite).toBeCloseTo(2 / 6, 12) // 1000 and 1019
    expect(a.shares.belowBlack).toBeCloseTo(1 / 6, 12)
  })

  it('reads several rows with padding, and a width that is not a multiple of six', () => {
    const w = 10; const h = 3
    const y: number[] = []; const cb: number[] = []; const cr: number[] = []
    for (let r = 0; r < h; r++) {
      for (let x = 0; x < w; x++) y.push(64 + r * 100 + x * 7)
      for (let x = 0; x < w / 2; x++) { cb.push(300 + r * 10 + x); cr.push(700 - r * 10 - x) }
    }
    const data = packV210(y, cb, cr, w, h)
    expect(data.length).toBe(128 * h)
    const src = makeRowSource({ kind: 'v210', data, width: w, height: h }, '601')
    const row = makeRowBuffers(w)
    for (let r = 0; r < h; r++) {
      src.readRow(r, row)
      expect(Array.from(row.y).map(v => v * 4)).toEqual(y.slice(r * w, r * w + w))
      expect(Math.round(512 + 896 * row.pb[9]!)).toBe(cb[r * 5 + 4])
      expect(Math.round(512 + 896 * row.pr[0]!)).toBe(cr[r * 5])
    }
  })
})

describe('planar Y\'CbCr', () => {
  it('4:4:4 and 4:2:2 at 10 bits agree where chroma is the same over each pair', () => {
    const w = 4; const h = 1
    const y = new Uint16Array([64, 500, 940, 1000])
    const p444 = analyseFrame({ kind: 'planar', y, cb: new Uint16Array([200, 200, 800, 800]), cr: new Uint16Array([512, 512, 600, 600]), width: w, height: h, bitDepth: 10, subsampling: '444' })
    const p422 = analyseFrame({ kind: 'planar', y, cb: new Uint16Array([200, 800]), cr: new Uint16Array([512, 600]), width: w, height: h, bitDepth: 10, subsampling: '422' })
    expect(p422.luma).toEqual(p444.luma)
    expect(p422.chroma).toEqual(p444.chroma)
    expect(p422.compositeIre).toEqual(p444.compositeIre)
    expect(p422.chroma.cbMin * 4).toBeCloseTo(200, 9)
    expect(p422.chroma.cbMax * 4).toBeCloseTo(800, 9)
  })

  it('line plot positions: 13.5 MHz at 720 wide, proportional otherwise (ITU-R BT.601 13.5 MHz sampling)', () => {
    const mk = (w: number) => ({ kind: 'planar' as const, y: new Uint8Array(w), cb: new Uint8Array(w / 2).fill(128), cr: new Uint8Array(w / 2).fill(128), width: w, height: 1, bitDepth: 8 as const, subsampling: '422' as const })
    const sd = linePlot(mk(720), 0).samples
    expect(sd[135]!.us).toBeCloseTo(10, 12) // 135 / 13.5 MHz
    expect(sd[719]!.us + 1 / 13.5).toBeCloseTo(53.333, 3) // 720 samples = 53.333 µs
    const hd = linePlot(mk(1920), 0).samples
    expect(hd[960]!.us).toBeCloseTo(sd[360]!.us, 12)
    expect(() => linePlot(mk(720), 1)).toThrow(/outside the picture/)
  })
})
