// Mean hue and chroma from Cb/Cr histograms, and the differences between two frames.
// Sources: bar codes of ITU-R BT.801-1 Table 1 (memory; computed from
// BT.601 §2.5 and cross-checked), NTSC levels, U/V weights and 75 % bar hue and chroma of
// SMPTE 170M / EG 1 (memory; the bar table computed from their equations), BT.709
// equations (ITU-R BT.709-6 Part 2). Tolerances: at least 0.5 IRE and 1°, because tables
// from rounded coefficients (0.30/0.59/0.11: up to 0.3 IRE and 0.6°, computed) and from
// rounded codes differ by that much.
import { describe, expect, it } from 'vitest'
import { compareFrames, hueTurn, meanChroma, type ComparableFrame } from '../../shared/utils/compare'

/** A Cb/Cr histogram holding `count` pixels at each (cb, cr) code pair. */
function hist(bins: number, pairs: Array<[cb: number, cr: number, count?: number]>) {
  const cb = new Array<number>(bins).fill(0)
  const cr = new Array<number>(bins).fill(0)
  for (const [b, r, n = 1] of pairs) {
    cb[b]! += n
    cr[r]! += n
  }
  return { bins, cb, cr }
}

// BT.601 75 % bars (8-bit and 10-bit Cb/Cr, BT.801-1 Table 1 — memory) beside SMPTE EG 1 hue and chroma p-p IRE (computed).
const BARS_75 = [
  { name: 'yellow', c8: [44, 142], c10: [176, 567], hue: 167.1, pp: 62.1 },
  { name: 'cyan', c8: [156, 44], c10: [625, 176], hue: 283.5, pp: 87.7 },
  { name: 'green', c8: [72, 58], c10: [289, 231], hue: 240.7, pp: 81.9 },
  { name: 'magenta', c8: [184, 198], c10: [735, 793], hue: 60.7, pp: 81.9 },
  { name: 'red', c8: [100, 212], c10: [399, 848], hue: 103.5, pp: 87.7 },
  { name: 'blue', c8: [212, 114], c10: [848, 457], hue: 347.1, pp: 62.1 },
] as const

describe('meanChroma', () => {
  for (const bar of BARS_75) {
    it(`gives the hue and chroma of a frame of 75 % ${bar.name} from its 8-bit codes`, () => {
      const m = meanChroma(hist(256, [[bar.c8[0], bar.c8[1], 1000]]))!
      // SMPTE EG 1 bar table (computed; SMPTE 170M weights — memory): ±1°, ±0.5 IRE.
      expect(Math.abs(hueTurn(bar.hue, m.hueDeg!))).toBeLessThanOrEqual(1)
      expect(m.amplitudeIre).toBeCloseTo(bar.pp, 0)
      expect(Math.abs(m.amplitudeIre - bar.pp)).toBeLessThanOrEqual(0.5)
    })

    it(`reads 75 % ${bar.name} from a 1024-bin histogram of 10-bit codes the same way`, () => {
      const m = meanChroma(hist(1024, [[bar.c10[0], bar.c10[1], 7]]))!
      // BT.801-1 10-bit codes against the EG 1 table (computed; memory for the weights).
      expect(Math.abs(hueTurn(bar.hue, m.hueDeg!))).toBeLessThanOrEqual(1)
      expect(Math.abs(m.amplitudeIre - bar.pp)).toBeLessThanOrEqual(0.5)
    })
  }

  it('follows the BT.601 and SMPTE 170M arithmetic for yellow 44/142 exactly', () => {
    // computed: Pb = (44 − 128)/224 = −0.375, Pr = (142 − 128)/224 = 0.0625;
    // U = 0.492111 × 1.772 × −0.375 = −0.327010, V = 0.877283 × 1.402 × 0.0625 = 0.076872;
    // p-p = 2 × 92.5 × √(U² + V²) = 62.15 IRE; phase = atan2(V, U) = 166.77°.
    const m = meanChroma(hist(256, [[44, 142]]))!
    expect(m.meanPb).toBeCloseTo(-0.375, 12)
    expect(m.meanPr).toBeCloseTo(0.0625, 12)
    expect(m.u).toBeCloseTo(-0.327010, 5)
    expect(m.v).toBeCloseTo(0.076872, 5)
    expect(m.amplitudeIre).toBeCloseTo(62.15, 2)
    expect(m.hueDeg!).toBeCloseTo(166.77, 2)
  })

  it('uses the BT.709 divisors when the reel is BT.709', () => {
    // computed from ITU-R BT.709-6: 75 % yellow, Y' = 0.75 × (0.2126 + 0.7152) = 0.69585,
    // B'−Y' = −0.69585, R'−Y' = 0.05415; U = −0.342437, V = 0.047505 → 172.10°, 63.96 IRE p-p.
    // The 8-bit codes 44/136 (SMPTE RP 219 / BT.2111 Table 2, BT.709 75 % — computed) are rounded, hence ±1° / ±0.5 IRE.
    const m = meanChroma(hist(256, [[44, 136]]), '709')!
    expect(Math.abs(hueTurn(172.10, m.hueDeg!))).toBeLessThanOrEqual(1)
    expect(Math.abs(m.amplitudeIre - 63.96)).toBeLessThanOrEqual(0.5)
    // computed: the same codes read with the BT.601 divisors give U = −0.327008 and 61.0 IRE p-p,
    // 3 IRE short of the BT.709 figure: the reel's matrix matters.
    expect(Math.abs(meanChroma(hist(256, [[44, 136]]), '601')!.amplitudeIre - 63.96)).toBeGreaterThan(2.5)
  })

  it('halves the chroma of a frame that is half 75 % yellow and half grey, keeping its hue', () => {
    // computed: the mean of (Pb, Pr) over the frame is half of yellow's; grey is 128/128 (BT.801-1 Table 1).
    const m = meanChroma(hist(256, [[44, 142, 500], [128, 128, 500]]))!
    expect(m.amplitudeIre).toBeCloseTo(62.15 / 2, 2)
    expect(m.hueDeg!).toBeCloseTo(166.77, 2)
  })

  it('finds no hue when opposite colours cancel (75 % yellow and blue in equal parts)', () => {
    // computed: yellow 44/142 and blue 212/114 (BT.801-1 Table 1) average to exactly 128/128.
    const m = meanChroma(hist(256, [[44, 142, 10], [212, 114, 10]]))!
    expect(m.amplitudeIre).toBeCloseTo(0, 9)
    expect(m.hueDeg).toBeNull()
  })

  it('answers null for an empty histogram and refuses a bin count that is not a code depth', () => {
    expect(meanChroma(hist(256, []))).toBeNull()
    expect(() => meanChroma({ bins: 300, cb: [], cr: [] })).toThrow(/power-of-two/)
  })
})

describe('hueTurn', () => {
  it('turns the short way round through 0°', () => {
    // computed: blue 347.1° → magenta 60.7° is +73.6°, not −286.4° (angles from the SMPTE EG 1 table).
    expect(hueTurn(347.1, 60.7)).toBeCloseTo(73.6, 6)
    expect(hueTurn(60.7, 347.1)).toBeCloseTo(-73.6, 6)
    expect(hueTurn(0, 180)).toBe(180)
  })
})

describe('compareFrames', () => {
  const frame = (luma: ComparableFrame['luma'], pairs: Array<[number, number, number?]>): ComparableFrame =>
    ({ matrix: '601', luma, histograms: hist(256, pairs) })
  // A: black at code 16, white at 235, mean 180 (75 % grey), mostly 75 % yellow.
  const a = frame({ min: 16, max: 235, mean: 180 }, [[44, 142]])
  // B: lifted black (code 20), white at 180, mean 131, mostly 75 % red.
  const b = frame({ min: 20, max: 180, mean: 131 }, [[100, 212]])

  it('gives black, white and mean in IRE with setup', () => {
    const c = compareFrames(a, b, 'ire')
    // computed (SMPTE 170M convention — memory): IRE = 7.5 + 92.5 × (Y − 16)/219.
    expect(c.black.a).toBeCloseTo(7.5, 9)
    expect(c.black.b).toBeCloseTo(7.5 + 92.5 * 4 / 219, 9)
    expect(c.black.diff).toBeCloseTo(1.689, 3)
    expect(c.white.a).toBeCloseTo(100, 9)
    // SMPTE EG 1 75 % bar table: 75 % grey is 76.9 IRE, cyan's luma 56.1 IRE; codes 180 and 131
    // (BT.801-1 Table 1) are rounded, so ±0.5 IRE as tables from rounded coefficients need (180 gives 76.77 by the formula).
    const near = (v: number, want: number) => expect(Math.abs(v - want)).toBeLessThanOrEqual(0.5)
    near(c.white.b, 76.9)
    near(c.mean.a, 76.9)
    near(c.mean.b, 56.1)
    near(c.mean.diff, 56.1 - 76.9)
    expect(c.white.diff).toBeCloseTo(92.5 * (180 - 235) / 219, 9)
  })

  it('gives the same differences in codes and in IRE without setup', () => {
    // ITU-R BT.601-7 Table 3 (memory): 8-bit white 235 → 10-bit 940 (the studio range scaled by 4).
    const codes8 = compareFrames(a, b, 'code8')
    expect(codes8.white.a).toBe(235)
    expect(codes8.black.diff).toBe(4)
    expect(compareFrames(a, b, 'code10').white.a).toBe(940)
    // computed (no setup — common practice, memory): IRE = 100 × (Y − 16)/219, so 4 codes = 1.826 IRE.
    expect(compareFrames(a, b, 'ire0').black.diff).toBeCloseTo(400 / 219, 9)
  })

  it('gives the turn of mean hue from A to B and the change of chroma', () => {
    const c = compareFrames(a, b, 'ire')
    // SMPTE EG 1 bar table: yellow 167.1°, red 103.5° → B sits 63.6° clockwise of A (±1°, memory weights).
    expect(Math.abs(c.hue.a! - 167.1)).toBeLessThanOrEqual(1)
    expect(Math.abs(c.hue.diff! - (103.5 - 167.1))).toBeLessThanOrEqual(1)
    // SMPTE EG 1 bar table: yellow 62.1, red 87.7 IRE p-p.
    expect(Math.abs(c.chroma.diff - (87.7 - 62.1))).toBeLessThanOrEqual(0.5)
  })

  it('leaves the hue difference empty when a frame is grey on average', () => {
    const grey = frame({ min: 16, max: 235, mean: 126 }, [[128, 128]])
    const c = compareFrames(a, grey, 'ire')
    expect(c.hue.b).toBeNull()
    expect(c.hue.diff).toBeNull()
    expect(c.chroma.b).toBe(0)
  })
})
