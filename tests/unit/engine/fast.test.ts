// The fast kernels (shared/engine/fast/: 8-bit R'G'B', UYVY, v210, planar 4:2:2, with vertical runs folded)
// against the reference pass (analyseFrameReference: the plain per-pixel arithmetic,
// every pixel on its own). Every count, bin, histogram, density and extreme
// must be identical; the only allowed difference is the luma mean of 8-bit R'G'B' (summed
// per run rather than per pixel), which may differ in the last bits of a double.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { AnalysisScratch, analyseFrame, packV210 } from '../../../shared/engine/index'
import { analyseFrameReference, GAMUT_MARGIN_RGB_CODE8 } from '../../../shared/engine/analyse'
import { fastMode, fastTuning } from '../../../shared/engine/fast/index'
import { HIGH_CHROMA, HIGH_LUMA, LOW_BAND, LV_OFF, LV_SCALE } from '../../../shared/engine/accumulate'
import { MATRICES } from '../../../shared/engine/matrix'
import type { FrameAnalysis, FrameInput, MatrixName } from '../../../shared/engine/index'
import { codes, frameOf, kinds, sampler, shape } from './frames'

const frames = fc.tuple(shape, kinds).map(([sh, kind]) => frameOf(sh, kind))

/** Grain: every sample drawn afresh, frames several stripes wide, so no run lasts a row. */
const noiseFrames = fc.tuple(fc.integer({ min: 100, max: 260 }).map(n => n * 2), fc.integer({ min: 1, max: 5 }), fc.integer(), kinds)
  .map(([w, h, seed, kind]) => frameOf({ w, h, templates: 1, change: 1, seed }, kind))

/**
 * UYVY with every 8-bit (Cb, Cr) pair once (Cb down, Cr across) and random luma: every
 * chroma offset the tables and bin shortcuts can meet, bin-edge cases included.
 */
function allChroma8(): FrameInput {
  const w = 512; const h = 256
  const rnd = sampler(99)
  const data = new Uint8Array(w * h * 2)
  for (let row = 0; row < h; row++) {
    for (let j = 0; j < w / 2; j++) {
      const i = (row * w + 2 * j) * 2
      data[i] = row; data[i + 1] = Math.floor(rnd() * 256); data[i + 2] = j; data[i + 3] = Math.floor(rnd() * 256)
    }
  }
  return { kind: 'uyvy', data, width: w, height: h }
}

/** v210 with every 10-bit Cr code against a spread of Cb codes, with random luma. */
function allChroma10(): FrameInput {
  const w = 2048; const h = 96
  const rnd = sampler(1234)
  const y = new Int32Array(w * h); const cb = new Int32Array(w * h / 2); const cr = new Int32Array(w * h / 2)
  for (let i = 0; i < w * h; i++) y[i] = Math.floor(rnd() * 1024)
  for (let row = 0; row < h; row++) {
    for (let j = 0; j < w / 2; j++) {
      cb[row * (w / 2) + j] = (row * 11 + (j >> 7) * 131) % 1024
      cr[row * (w / 2) + j] = j
    }
  }
  return { kind: 'v210', data: packV210(y, cb, cr, w, h), width: w, height: h }
}

/** Index of the first difference of two typed arrays, −1 if none (toEqual is slow on megabytes). */
function firstDiff(a: Uint32Array, b: Uint32Array): number {
  if (a.length !== b.length) return -2
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return i
  return -1
}

function expectSame(fast: FrameAnalysis, ref: FrameAnalysis, input: FrameInput): void {
  expect(fast.waveform === undefined).toBe(ref.waveform === undefined)
  if (fast.waveform && ref.waveform) {
    const fw = fast.waveform; const rw = ref.waveform
    for (const [f, r] of [[fw.luma, rw.luma], [fw.flat, rw.flat], [fw.rgb.r, rw.rgb.r], [fw.rgb.g, rw.rgb.g], [fw.rgb.b, rw.rgb.b], [fast.vectorscope!.data, ref.vectorscope!.data]] as const) {
      expect(firstDiff(f, r)).toBe(-1)
    }
    expect({ ...fw, luma: 0, flat: 0, rgb: 0 }).toEqual({ ...rw, luma: 0, flat: 0, rgb: 0 })
    expect(fast.vectorscope!.size).toBe(ref.vectorscope!.size)
    // The range mask too, block for block.
    expect([fast.rangeMask!.width, fast.rangeMask!.height]).toEqual([ref.rangeMask!.width, ref.rangeMask!.height])
    expect(firstDiff(Uint32Array.from(fast.rangeMask!.data), Uint32Array.from(ref.rangeMask!.data))).toBe(-1)
    fast = { ...fast, waveform: undefined, vectorscope: undefined, rangeMask: undefined }
    ref = { ...ref, waveform: undefined, vectorscope: undefined, rangeMask: undefined }
  }
  if (input.kind === 'rgb') {
    expect(fast.luma.mean).toBeCloseTo(ref.luma.mean, 9)
    expect(fast.lumaIre.mean).toBeCloseTo(ref.lumaIre.mean, 9)
    const strip = (a: FrameAnalysis) => ({ ...a, luma: { ...a.luma, mean: 0 }, lumaIre: { ...a.lumaIre, mean: 0 } })
    expect(strip(fast)).toEqual(strip(ref))
  }
  else {
    expect(fast).toEqual(ref)
  }
}

describe('fast kernels equal the reference pass', () => {
  it('statistics, distributions, histograms and verdict, for either matrix', () => {
    fc.assert(fc.property(frames, fc.constantFrom<MatrixName>('601', '709'), (input, matrix) => {
      expectSame(analyseFrame(input, { matrix }), analyseFrameReference(input, { matrix }), input)
    }), { numRuns: 150 })
  })

  it('waveform and vectorscope densities too', () => {
    fc.assert(fc.property(frames, fc.constantFrom<MatrixName>('601', '709'), (input, matrix) => {
      expectSame(analyseFrame(input, { matrix, keepDensities: true }), analyseFrameReference(input, { matrix, keepDensities: true }), input)
    }), { numRuns: 60 })
  })

  it('a v210 buffer not aligned to four bytes reads the same as an aligned one', () => {
    const w = 100; const h = 3
    const rnd = sampler(7)
    const y = codes(h, w, 2, 0.2, rnd, 1023); const cb = codes(h, w / 2, 2, 0.2, rnd, 1023); const cr = codes(h, w / 2, 2, 0.2, rnd, 1023)
    const packed = packV210(y, cb, cr, w, h)
    const shifted = new Uint8Array(packed.length + 1).subarray(1)
    shifted.set(packed)
    const a = analyseFrame({ kind: 'v210', data: shifted, width: w, height: h }, { keepDensities: true })
    expect(a).toEqual(analyseFrameReference({ kind: 'v210', data: packed, width: w, height: h }, { keepDensities: true }))
  })

  it('planar planes not on a word boundary read the same as aligned ones', () => {
    const w = 100; const h = 3
    const rnd = sampler(11)
    for (const deep of [false, true]) {
      const max = deep ? 1023 : 255
      const make = (n: number) => { const a = deep ? new Uint16Array(n + 1).subarray(1) : new Uint8Array(n + 1).subarray(1); for (let i = 0; i < n; i++) a[i] = Math.floor(rnd() * (max + 1)) % (max + 1); return a }
      const y = make(w * h); const cb = make(w * h / 2); const cr = make(w * h / 2)
      // Two rows alike, so runs are folded on the shifted route too.
      y.copyWithin(w, 0, w); cb.copyWithin(w / 2, 0, w / 2); cr.copyWithin(w / 2, 0, w / 2)
      const input: FrameInput = { kind: 'planar', y, cb, cr, width: w, height: h, bitDepth: deep ? 10 : 8, subsampling: '422' }
      expect(y.byteOffset % 2).toBe(deep ? 0 : 1)
      expect(analyseFrame(input, { keepDensities: true })).toEqual(analyseFrameReference(input, { keepDensities: true }))
    }
  })

  it('a whole frame of one colour (one run per column) counts every pixel once', () => {
    const w = 300; const h = 40
    const data = new Uint8Array(w * h * 3)
    for (let i = 0; i < w * h; i++) { data[i * 3] = 191; data[i * 3 + 1] = 191; data[i * 3 + 2] = 0 }
    const input: FrameInput = { kind: 'rgb', data, width: w, height: h, channels: 3, bitDepth: 8, range: 'full' }
    const a = analyseFrame(input, { keepDensities: true })
    expectSame(a, analyseFrameReference(input, { keepDensities: true }), input)
    // 75 % yellow: Y' = 0.886 · 0.75 (ITU-R BT.601-7 §2.5 — clause from memory): one level bin holds all.
    expect(Math.max(...a.histograms.levels.luma)).toBe(w * h)
    expect(a.luma.min).toBeCloseTo(16 + 219 * 0.886 * 191 / 255, 9)
  })

  it('pure noise (no vertical repeats), with and without densities', () => {
    fc.assert(fc.property(noiseFrames, fc.constantFrom<MatrixName>('601', '709'), fc.boolean(), (input, matrix, keepDensities) => {
      expectSame(analyseFrame(input, { matrix, keepDensities }), analyseFrameReference(input, { matrix, keepDensities }), input)
    }), { numRuns: 40 })
  })

  it('every 8-bit Cb/Cr pair, and every 10-bit Cr code, bin for bin', () => {
    for (const input of [allChroma8(), allChroma10()]) {
      for (const matrix of ['601', '709'] as const) {
        const a = analyseFrame(input, { matrix, keepDensities: true })
        expectSame(a, analyseFrameReference(input, { matrix, keepDensities: true }), input)
        expect(a.histograms.levels.compMax.reduce((s, c) => s + c, 0)).toBe(input.width * input.height)
      }
    }
  })

  it('the float route beside the integer bin shortcut agrees too', () => {
    // A band this wide sends about 40 % of chroma pairs (every 8- and 10-bit pair checked) down the float route.
    const saved = fastTuning.edgeEps
    fastTuning.edgeEps = 0.06
    try {
      for (const input of [allChroma8(), allChroma10()]) {
        expectSame(analyseFrame(input, { matrix: '709', keepDensities: true }), analyseFrameReference(input, { matrix: '709', keepDensities: true }), input)
      }
      fc.assert(fc.property(frames, fc.constantFrom<MatrixName>('601', '709'), (input, matrix) => {
        expectSame(analyseFrame(input, { matrix, keepDensities: true }), analyseFrameReference(input, { matrix, keepDensities: true }), input)
      }), { numRuns: 40 })
    }
    finally {
      fastTuning.edgeEps = saved
    }
  })

  it('8-bit R\'G\'B\' measured pixel by pixel (chroma looked up or computed), by runs, or switching between them, gives the same', () => {
    // The kernel picks per stripe; each route on its own must equal the reference too.
    const saved = { ...fastMode }
    try {
      for (const [mode, chroma] of [['direct', 'table'], ['direct', 'math'], ['runs', 'auto'], ['auto', 'auto'], ['auto', 'math']] as const) {
        fastMode.rgb = mode
        fastMode.chroma = chroma
        fc.assert(fc.property(fc.tuple(shape, fc.constantFrom('rgb3', 'rgb4', 'rgbStudio')), fc.constantFrom<MatrixName>('601', '709'), ([sh, kind], matrix) => {
          const input = frameOf({ ...sh, h: sh.h * 3 }, kind)
          expectSame(analyseFrame(input, { matrix, keepDensities: true }), analyseFrameReference(input, { matrix, keepDensities: true }), input)
        }), { numRuns: 30 })
      }
    }
    finally {
      Object.assign(fastMode, saved)
    }
  })

  it('8-bit R\'G\'B\' wider than the waveform (two frame columns to a density column), frame after frame with one scratch, gives the same', () => {
    // The R'G'B' waveform densities and per-code counts are folded from per-column code
    // counts kept between frames: a column fold or a reset gone wrong shows here, where
    // columns are decimated and widths change from frame to frame.
    const scratch = new AnalysisScratch()
    const wide = fc.record({
      w: fc.integer({ min: 513, max: 700 }).map(n => n * 2),
      h: fc.integer({ min: 1, max: 4 }),
      templates: fc.integer({ min: 1, max: 3 }),
      change: fc.constantFrom(0, 0.3, 1),
      seed: fc.integer(),
    })
    // Frames this small never have rows enough to choose the column counts by themselves.
    const saved = { ...fastMode }
    try {
      fastMode.columns = 'always'
      for (const mode of ['direct', 'auto'] as const) {
        fastMode.rgb = mode
        fc.assert(fc.property(wide, fc.constantFrom('rgb3', 'rgb4', 'rgbStudio'), fc.constantFrom<MatrixName>('601', '709'), (sh, kind, matrix) => {
          const input = frameOf(sh, kind)
          const fast = analyseFrame(input, { matrix, keepDensities: true, scratch })
          expect(fast.waveform!.decimation).toBe(2)
          expectSame(fast, analyseFrameReference(input, { matrix, keepDensities: true }), input)
        }), { numRuns: 15 })
      }
    }
    finally {
      Object.assign(fastMode, saved)
    }
  })

  it('for every one of the 2^24 8-bit triples, the R\', G\', B\' level bins and gamut flags depend on the channel code alone, and full range stays legal', () => {
    // The 8-bit R'G'B' kernel counts R', G', B' (and their max and min) per code, where the
    // reference bins Y' + (R'−Y') etc. per pixel. Here the reference's expressions
    // (analyse.ts, decode.ts) are evaluated for every triple and held to the per-code bin.
    for (const matrix of ['601', '709'] as const) {
      const { kr, kb, kg, cbDiv, crDiv } = MATRICES[matrix]
      const rK = 219 * crDiv; const bK = 219 * cbDiv
      const gR = -219 * kr * crDiv / kg; const gB = -219 * kb * cbDiv / kg
      for (const full of [true, false]) {
        const scale = full ? 1 / 255 : 1 / 219
        const offset = full ? 0 : -16 / 219
        const gamHi = 235 + GAMUT_MARGIN_RGB_CODE8; const gamLo = 16 - GAMUT_MARGIN_RGB_CODE8
        const bin = new Int32Array(256); const out = new Int32Array(256); const v = new Float64Array(256)
        for (let c = 0; c < 256; c++) {
          v[c] = c * scale + offset
          const level = 16 + 219 * v[c]!
          bin[c] = (level * LV_SCALE + LV_OFF) | 0
          out[c] = +(level > gamHi) | +(level < gamLo)
        }
        let bad = 0; let outs = 0; let studio = 0
        for (let r = 0; r < 256; r++) {
          for (let g = 0; g < 256; g++) {
            const gg = v[g]!
            for (let b = 0; b < 256; b++) {
              // decode.ts: Y' − G' and the colour differences from the code differences.
              const dr = (r - g) * scale; const db = (b - g) * scale
              const t = kr * dr + kb * db
              const y = 16 + 219 * (gg + t)
              const pb = (db - t) / cbDiv; const pr = (dr - t) / crDiv
              const yr = y + rK * pr; const yg = y + (gR * pr + gB * pb); const yb = y + bK * pb
              bad += +(((yr * LV_SCALE + LV_OFF) | 0) !== bin[r]) + +(((yg * LV_SCALE + LV_OFF) | 0) !== bin[g]) + +(((yb * LV_SCALE + LV_OFF) | 0) !== bin[b])
              const gamut = +(yr > gamHi) | +(yg > gamHi) | +(yb > gamHi) | +(yr < gamLo) | +(yg < gamLo) | +(yb < gamLo)
              bad += +(gamut !== (out[r]! | out[g]! | out[b]!))
              outs += gamut
              const cb = 128 + 224 * pb; const cr = 128 + 224 * pr
              studio += +(cb < LOW_BAND) | +(cb >= HIGH_CHROMA) | +(cr < LOW_BAND) | +(cr >= HIGH_CHROMA) | +(y < LOW_BAND) | +(y >= HIGH_LUMA)
            }
          }
        }
        expect(bad).toBe(0)
        // Full-range codes are all legal; studio-range codes below 16 or above 235 are not.
        expect(outs).toBe(full ? 0 : 2 ** 24 - 220 ** 3)
        // Nor does any full-range triple leave the studio range as Y'CbCr (BT.601-7 §2.5 scaling).
        if (full) expect(studio).toBe(0)
        else expect(studio).toBeGreaterThan(0)
      }
    }
  })
})
