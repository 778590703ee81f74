// UYVY (8-bit 4:2:2): one 32-bit word per pair of pixels is the unit of a vertical run.
import type { Kernel} from './kernel';
import { Queue } from './kernel'
import { pairBatch, PairTables } from './pairs'

export function uyvy(data: Uint8Array, width: number, height: number, k: Kernel, stripe: number): PairTables {
  const tb = PairTables.for(256, 128, 224, 1, k)
  const pairs = stripe >> 1
  const keys = new Int32Array(pairs)
  const runs = new Int32Array(pairs)
  const q = new Queue(pairs)
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const np = Math.min(stripe, width - x0) >> 1
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      let i = (row * width + x0) * 2
      for (let j = 0; j < np; j++, i += 4) {
        const run = runs[j]!
        if (!last) {
          const key = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)
          if (key === keys[j] && run) {
            runs[j] = run + 1
            continue
          }
          if (run) {
            const old = keys[j]!
            QX[m] = x0 + 2 * j; QCb[m] = old & 255; QY0[m] = (old >>> 8) & 255; QCr[m] = (old >>> 16) & 255; QY1[m] = old >>> 24; QN[m++] = run
          }
          keys[j] = key
          runs[j] = 1
        }
        else {
          const old = keys[j]!
          QX[m] = x0 + 2 * j; QCb[m] = old & 255; QY0[m] = (old >>> 8) & 255; QCr[m] = (old >>> 16) & 255; QY1[m] = old >>> 24; QN[m++] = run
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}
