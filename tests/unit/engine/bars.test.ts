// Colour-bar codes and the BT.601 / BT.709 equations.
// Sources: ITU-R BT.601-7 §2.5 (clause numbers from memory), ITU-R BT.709-6
// Part 2 items 3.2–3.4 , bar tables of ITU-R BT.801-1 Table 1 (memory) and SMPTE RP 219 /
// ITU-R BT.2111 Table 2 (computed), and worked examples computed from the BT.601 equations.
import { describe, expect, it } from 'vitest'
import { analyseFrame, barRgb, makeRowBuffers, makeRowSource, MATRICES, packV210, quantiseYCbCr, rgbToYPbPr, yPbPrToRgb } from '../../../shared/engine/index'
import type { BarName, MatrixName } from '../../../shared/engine/index'
import { solidRgb16 } from './helpers'

type Codes = [number, number, number]
// ITU-R BT.801-1 Table 1 (memory; computed from BT.601), 100/0/75/0 bars: 8-bit Y/Cb/Cr and 10-bit Y/Cb/Cr.
const BT601_75: Record<BarName, [Codes, Codes]> = {
  white: [[235, 128, 128], [940, 512, 512]],
  yellow: [[162, 44, 142], [646, 176, 567]],
  cyan: [[131, 156, 44], [525, 625, 176]],
  green: [[112, 72, 58], [450, 289, 231]],
  magenta: [[84, 184, 198], [335, 735, 793]],
  red: [[65, 100, 212], [260, 399, 848]],
  blue: [[35, 212, 114], [139, 848, 457]],
  black: [[16, 128, 128], [64, 512, 512]],
}
// BT.601 100/0/100/0 bars (computed from the BT.601 equations).
const BT601_100: Partial<Record<BarName, [Codes, Codes]>> = {
  yellow: [[210, 16, 146], [840, 64, 585]],
  cyan: [[170, 166, 16], [678, 663, 64]],
  green: [[145, 54, 34], [578, 215, 137]],
  magenta: [[106, 202, 222], [426, 809, 887]],
  red: [[81, 90, 240], [326, 361, 960]],
  blue: [[41, 240, 110], [164, 960, 439]],
}
// BT.709 bars, 8-bit (SMPTE RP 219 / ITU-R BT.2111 Table 2 — computed from BT.709-6).
const BT709_75: Partial<Record<BarName, Codes>> = {
  yellow: [168, 44, 136], cyan: [145, 147, 44], green: [133, 63, 52],
  magenta: [63, 193, 204], red: [51, 109, 212], blue: [28, 212, 120],
}
const BT709_100: Partial<Record<BarName, Codes>> = {
  yellow: [219, 16, 138], cyan: [188, 154, 16], green: [173, 42, 26],
  magenta: [78, 214, 230], red: [63, 102, 240], blue: [32, 240, 118],
}

function measuredCodes(name: BarName, amplitude: number, matrix: MatrixName): { y: number, cb: number, cr: number } {
  const c = barRgb(name, amplitude)
  const a = analyseFrame(solidRgb16(c.r, c.g, c.b), { matrix })
  // A uniform frame: min = max = the level itself.
  expect(a.luma.max - a.luma.min).toBeLessThan(1e-9)
  return { y: a.luma.mean, cb: a.chroma.cbMin, cr: a.chroma.crMin }
}

describe('BT.601 / BT.709 equations (ITU-R BT.601-7 §2.5, BT.709-6 Part 2)', () => {
  it('luma weights sum to one and the colour-difference divisors are 2(1 − K)', () => {
    for (const m of Object.values(MATRICES)) {
      expect(m.kr + m.kg + m.kb).toBeCloseTo(1, 12)
      expect(m.cbDiv).toBeCloseTo(2 * (1 - m.kb), 12)
      expect(m.crDiv).toBeCloseTo(2 * (1 - m.kr), 12)
    }
  })

  it('worked example: full-range (255, 0, 0) gives 81/90/240 (computed from ITU-R BT.601)', () => {
    // Y = 16 + 65.481·1 = 81.481 → 81; Cb = 128 − 37.797 = 90.2 → 90; Cr = 128 + 112 = 240.
    expect(quantiseYCbCr(rgbToYPbPr(1, 0, 0, '601'))).toEqual({ y: 81, cb: 90, cr: 240 })
    const a = analyseFrame(solidRgb16(1, 0, 0))
    expect(a.luma.mean).toBeCloseTo(81.481, 3)
    expect(a.chroma.cbMin).toBeCloseTo(128 - 37.797, 3)
    expect(a.chroma.crMin).toBeCloseTo(240, 3)
  })

  it('the integer matrix derived from the BT.601 equations agrees with the engine for arbitrary R\'G\'B\'', () => {
    const samples: Array<[number, number, number]> = [[0.1, 0.5, 0.9], [0.8, 0.2, 0.3], [0.33, 0.66, 0.01]]
    for (const [r, g, b] of samples) {
      const a = analyseFrame(solidRgb16(r, g, b))
      const [R, G, B] = [Math.round(r * 65535) / 65535, Math.round(g * 65535) / 65535, Math.round(b * 65535) / 65535]
      expect(a.luma.mean).toBeCloseTo(16 + 65.481 * R + 128.553 * G + 24.966 * B, 2)
      expect(a.chroma.cbMin).toBeCloseTo(128 - 37.797 * R - 74.203 * G + 112.0 * B, 2)
      expect(a.chroma.crMin).toBeCloseTo(128 + 112.0 * R - 93.786 * G - 18.214 * B, 2)
    }
  })

  it('Y\'PbPr round-trips to R\'G\'B\' under both matrices', () => {
    for (const m of ['601', '709'] as const) {
      const p = rgbToYPbPr(0.2, 0.7, 0.4, m)
      const back = yPbPrToRgb(p.y, p.pb, p.pr, m)
      expect(back.r).toBeCloseTo(0.2, 12); expect(back.g).toBeCloseTo(0.7, 12); expect(back.b).toBeCloseTo(0.4, 12)
    }
  })

  it('quantisation: black/white 16/235 and 64/940, chroma centre 128/512, extremes 16/240 and 64/960 (BT.601 Table 3)', () => {
    expect(quantiseYCbCr({ y: 0, pb: 0, pr: 0 }, 8)).toEqual({ y: 16, cb: 128, cr: 128 })
    expect(quantiseYCbCr({ y: 1, pb: 0.5, pr: -0.5 }, 8)).toEqual({ y: 235, cb: 240, cr: 16 })
    expect(quantiseYCbCr({ y: 0, pb: 0, pr: 0 }, 10)).toEqual({ y: 64, cb: 512, cr: 512 })
    expect(quantiseYCbCr({ y: 1, pb: 0.5, pr: -0.5 }, 10)).toEqual({ y: 940, cb: 960, cr: 64 })
  })

  it('10-bit codes are rounded from the exact value, not 4× the 8-bit code (ITU-R BT.601 quantisation)', () => {
    // 75 % yellow: Y' = 0.75·(0.299 + 0.587) = 0.6645; 219·0.6645 + 16 = 161.5255 → 162;
    // ×4 = 646.1 → 646, whereas 4·162 = 648.
    const p = rgbToYPbPr(0.75, 0.75, 0, '601')
    expect(quantiseYCbCr(p, 8).y).toBe(162)
    expect(quantiseYCbCr(p, 10).y).toBe(646)
  })
})

describe('colour-bar codes measured from synthetic bars (ITU-R BT.801-1 Table 1 — memory; ±1 code)', () => {
  for (const [name, [c8, c10]] of Object.entries(BT601_75) as Array<[BarName, [Codes, Codes]]>) {
    it(`BT.601 75 % ${name}: ${c8.join('/')} | ${c10.join('/')}`, () => {
      const m = measuredCodes(name, name === 'white' ? 1 : 0.75, '601')
      expect(Math.abs(m.y - c8[0])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cb - c8[1])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cr - c8[2])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.y * 4 - c10[0])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cb * 4 - c10[1])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cr * 4 - c10[2])).toBeLessThanOrEqual(1)
    })
  }

  it('BT.601 75 % grey is 180/128/128 | 721/512/512', () => {
    const m = measuredCodes('white', 0.75, '601')
    expect(Math.abs(m.y - 180)).toBeLessThanOrEqual(1)
    expect(Math.abs(m.y * 4 - 721)).toBeLessThanOrEqual(1)
    expect(m.cb).toBeCloseTo(128, 9); expect(m.cr).toBeCloseTo(128, 9)
  })

  for (const [name, [c8, c10]] of Object.entries(BT601_100) as Array<[BarName, [Codes, Codes]]>) {
    it(`BT.601 100 % ${name}: ${c8.join('/')} | ${c10.join('/')}`, () => {
      const m = measuredCodes(name, 1, '601')
      expect(Math.abs(m.y - c8[0])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cb - c8[1])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cr - c8[2])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.y * 4 - c10[0])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cb * 4 - c10[1])).toBeLessThanOrEqual(1)
      expect(Math.abs(m.cr * 4 - c10[2])).toBeLessThanOrEqual(1)
    })
  }

  for (const [label, table, amp] of [['75 %', BT709_75, 0.75], ['100 %', BT709_100, 1]] as const) {
    for (const [name, c8] of Object.entries(table) as Array<[BarName, Codes]>) {
      it(`BT.709 ${label} ${name}: ${c8.join('/')}`, () => {
        const m = measuredCodes(name, amp, '709')
        expect(Math.abs(m.y - c8[0])).toBeLessThanOrEqual(1)
        expect(Math.abs(m.cb - c8[1])).toBeLessThanOrEqual(1)
        expect(Math.abs(m.cr - c8[2])).toBeLessThanOrEqual(1)
      })
    }
  }

  it('a whole 8-bit R\'G\'B\' bar frame (codes 191/0) reads as the table\'s 8-bit codes, ±1', () => {
    const names = Object.keys(BT601_75) as BarName[]
    const barW = 8
    const width = names.length * barW
    const data = new Uint8Array(width * 3)
    names.forEach((n, k) => {
      const c = barRgb(n, n === 'white' ? 1 : 0.75)
      for (let x = k * barW; x < (k + 1) * barW; x++) {
        data[x * 3] = Math.round(c.r * 255); data[x * 3 + 1] = Math.round(c.g * 255); data[x * 3 + 2] = Math.round(c.b * 255)
      }
    })
    const src = makeRowSource({ kind: 'rgb', data, width, height: 1, channels: 3, bitDepth: 8, range: 'full' }, '601')
    const row = makeRowBuffers(width)
    src.readRow(0, row)
    names.forEach((n, k) => {
      const x = k * barW + barW / 2
      const [Y, Cb, Cr] = BT601_75[n][0]
      expect(Math.abs(row.y[x]! - Y)).toBeLessThanOrEqual(1)
      expect(Math.abs(128 + 224 * row.pb[x]! - Cb)).toBeLessThanOrEqual(1)
      expect(Math.abs(128 + 224 * row.pr[x]! - Cr)).toBeLessThanOrEqual(1)
    })
  })

  it('bars coded as 10-bit v210 with the table codes read back exactly', () => {
    const names = Object.keys(BT601_75) as BarName[]
    const width = names.length * 6
    const y: number[] = []; const cb: number[] = []; const cr: number[] = []
    for (const n of names) {
      const [Y, Cb, Cr] = BT601_75[n][1]
      for (let i = 0; i < 6; i++) y.push(Y)
      for (let i = 0; i < 3; i++) { cb.push(Cb); cr.push(Cr) }
    }
    const src = makeRowSource({ kind: 'v210', data: packV210(y, cb, cr, width, 1), width, height: 1 }, '601')
    const row = makeRowBuffers(width)
    src.readRow(0, row)
    names.forEach((n, k) => {
      const [Y, Cb, Cr] = BT601_75[n][1]
      for (let x = k * 6; x < k * 6 + 6; x++) {
        expect(row.y[x]! * 4).toBe(Y)
        expect(512 + 896 * row.pb[x]!).toBeCloseTo(Cb, 9)
        expect(512 + 896 * row.pr[x]!).toBeCloseTo(Cr, 9)
      }
    })
  })
})
