// Planar 4:2:2 Y'CbCr (8 or 10 bits; what clips are piped as, one plane each of Y', Cb, Cr):
// one pair of pixels — two luma codes and their Cb, Cr — is the unit of a vertical run. The
// four codes are packed into one number as the key (10 bits each: 2^40 at most, exact in a
// double), so a repeat costs one compare, as for a UYVY word.
import type { Kernel } from './kernel'
import { Queue } from './kernel'
import { pairBatch, PairTables } from './pairs'

export function planar422(
  yP: Uint8Array | Uint16Array, cbP: Uint8Array | Uint16Array, crP: Uint8Array | Uint16Array,
  width: number, height: number, bitDepth: 8 | 10, k: Kernel, stripe: number,
): PairTables {
  // The same per-code tables as UYVY (8-bit) and v210 (10-bit): the reference reads a planar
  // sample by the same expressions ((code − centre)/span, code/div) as those packings.
  const tb = bitDepth === 8 ? PairTables.for(256, 128, 224, 1, k) : PairTables.for(1024, 512, 896, 0.25, k)
  const cw = width >> 1
  const pairs = stripe >> 1
  const keys = new Float64Array(pairs)
  const runs = new Int32Array(pairs)
  const q = new Queue(pairs)
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  const K1 = 1024; const K2 = 1024 * 1024; const K3 = 1024 * 1024 * 1024
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const np = Math.min(stripe, width - x0) >> 1
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      let yi = row * width + x0
      let ci = row * cw + (x0 >> 1)
      for (let j = 0; j < np; j++, yi += 2, ci++) {
        const run = runs[j]!
        if (!last) {
          const key = yP[yi]! + K1 * yP[yi + 1]! + K2 * cbP[ci]! + K3 * crP[ci]!
          if (key === keys[j] && run) {
            runs[j] = run + 1
            continue
          }
          if (run) m = queuePair(QX, QCb, QCr, QY0, QY1, QN, m, x0 + 2 * j, keys[j]!, run)
          keys[j] = key
          runs[j] = 1
        }
        else {
          m = queuePair(QX, QCb, QCr, QY0, QY1, QN, m, x0 + 2 * j, keys[j]!, run)
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}

function queuePair(QX: Int32Array, QCb: Int32Array, QCr: Int32Array, QY0: Int32Array, QY1: Int32Array, QN: Int32Array, m: number, x: number, key: number, run: number): number {
  // key = y0 + 1024·y1 + 1024²·cb + 1024³·cr, each below 1024.
  const lo = key % 1048576
  const hi = (key - lo) / 1048576
  QX[m] = x; QY0[m] = lo & 1023; QY1[m] = lo >>> 10; QCb[m] = hi & 1023; QCr[m] = hi >>> 10; QN[m] = run
  return m + 1
}
