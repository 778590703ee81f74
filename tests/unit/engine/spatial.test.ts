// The spatial pass (lowpass.ts: R'G'B' after the 3×3 binomial low-pass, and the 3×3-region
// minima and maxima of luma, the composite envelope and R'G'B') against its plain statement,
// spatialLevelsReference, which takes every extreme on the levels themselves and bins it
// after. Every one of the eight distributions must be identical, bin for bin, on every input
// kind, on frames one pixel wide or high (the border repeats), on grain and on flat areas.
// (Checked to fail: a 3×3 maximum over two rows instead of three, and the filter's 2·x
// written as x + x, which rounds differently, are both caught.)
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { makeRowSource } from '../../../shared/engine/decode'
import { spatialLevels, spatialLevelsReference, SPATIAL_KEYS } from '../../../shared/engine/lowpass'
import { LEVEL_BINS, LEVEL_MIN, LEVEL_STEP } from '../../../shared/engine/levels'
import { MATRICES, U_WEIGHT, V_WEIGHT } from '../../../shared/engine/matrix'
import type { FrameInput, LevelDistributions, MatrixName } from '../../../shared/engine/index'
import { frameOf, kinds, sampler, shape } from './frames'

function both(input: FrameInput, matrix: MatrixName) {
  const m = MATRICES[matrix]
  const uK = U_WEIGHT * m.cbDiv; const vK = V_WEIGHT * m.crDiv
  const empty = (): LevelDistributions => ({ min: LEVEL_MIN, step: LEVEL_STEP } as LevelDistributions)
  const fast = empty(); const ref = empty()
  spatialLevels(makeRowSource(input, matrix), uK, vK, fast)
  spatialLevelsReference(makeRowSource(input, matrix), uK, vK, ref)
  return { fast, ref }
}

function expectSame(input: FrameInput, matrix: MatrixName) {
  const { fast, ref } = both(input, matrix)
  for (const k of SPATIAL_KEYS) {
    expect(fast[k]!.length).toBe(LEVEL_BINS)
    // Every pixel lands in each distribution once.
    expect(fast[k]!.reduce((a, b) => a + b, 0)).toBe(input.width * input.height)
    expect(Buffer.from(fast[k]!.buffer).equals(Buffer.from(ref[k]!.buffer)), k).toBe(true)
  }
}

/** 16-bit R'G'B' and 4:4:4 planar, of any width (odd ones too): kinds no fast kernel reads. */
function otherFrame(w: number, h: number, seed: number, kind: 'rgb16' | 'planar444'): FrameInput {
  const rnd = sampler(seed)
  if (kind === 'rgb16') {
    const data = new Uint16Array(w * h * 3).map(() => Math.floor(rnd() * 65536))
    return { kind: 'rgb', data, width: w, height: h, channels: 3, bitDepth: 16, range: 'full' }
  }
  const plane = () => new Uint16Array(w * h).map(() => Math.floor(rnd() * 1024))
  return { kind: 'planar', y: plane(), cb: plane(), cr: plane(), width: w, height: h, bitDepth: 10, subsampling: '444' }
}

/** A frame whose row i is row order[i] of `t` (a three-row frame of a fast kernel's kind). */
function stackRows(t: FrameInput, order: number[], h: number): FrameInput {
  const w = t.width
  if (t.kind === 'rgb') {
    const ch = t.channels; const data = new Uint8Array(w * h * ch)
    order.forEach((r, i) => data.set((t.data as Uint8Array).subarray(r * w * ch, (r + 1) * w * ch), i * w * ch))
    return { ...t, data, height: h }
  }
  if (t.kind === 'uyvy') {
    const data = new Uint8Array(w * h * 2)
    order.forEach((r, i) => data.set(t.data.subarray(r * w * 2, (r + 1) * w * 2), i * w * 2))
    return { ...t, data, height: h }
  }
  if (t.kind !== 'planar') throw new Error(`stackRows: ${t.kind}`)
  const plane = (p: Uint8Array | Uint16Array, pw: number) => {
    const out = new Uint16Array(pw * h)
    order.forEach((r, i) => out.set(p.subarray(r * pw, (r + 1) * pw), i * pw))
    return out
  }
  return { ...t, y: plane(t.y, w), cb: plane(t.cb, w / 2), cr: plane(t.cr, w / 2), height: h }
}

describe('spatial pass', () => {
  it('matches its reference on frames of every kind the kernels read, both matrices', () => {
    fc.assert(fc.property(shape, kinds, fc.constantFrom<MatrixName>('601', '709'), (sh, kind, matrix) => {
      expectSame(frameOf(sh, kind), matrix)
    }), { numRuns: 150 })
  })

  it('matches on 16-bit R\'G\'B\' and 4:4:4, odd widths, one-pixel rows and columns', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 37 }), fc.integer({ min: 1, max: 9 }), fc.integer(),
      fc.constantFrom<'rgb16' | 'planar444'>('rgb16', 'planar444'), fc.constantFrom<MatrixName>('601', '709'),
      (w, h, seed, kind, matrix) => { expectSame(otherFrame(w, h, seed, kind), matrix) }), { numRuns: 150 })
  })

  it('matches on pictures whose rows repeat in blocks (bars, graphics, letterbox): the repeat shortcut', () => {
    const blocks = fc.array(fc.tuple(fc.integer({ min: 0, max: 2 }), fc.integer({ min: 1, max: 7 })), { minLength: 1, maxLength: 6 })
    fc.assert(fc.property(blocks, fc.integer({ min: 1, max: 40 }), fc.integer(), fc.constantFrom('rgb3', 'uyvy', 'planar10'),
      (bl, halfW, seed, kind) => {
        // Three template rows; the frame is the blocks' rows stacked (a block: one template, repeated).
        const w = halfW * 2
        const t = frameOf({ w, h: 3, templates: 3, change: 1, seed }, kind)
        const h = bl.reduce((a, [, n]) => a + n, 0)
        const order = bl.flatMap(([ti, n]) => Array.from({ length: n }, () => ti))
        expectSame(stackRows(t, order, h), '709')
      }), { numRuns: 200 })
  })

  it('matches on grain: every sample drawn afresh, no run lasting a row', () => {
    for (const kind of ['rgb3', 'rgbStudio', 'uyvy', 'v210', 'planar8', 'planar10']) {
      expectSame(frameOf({ w: 500, h: 6, templates: 1, change: 1, seed: 7 }, kind), '709')
    }
  })
})
