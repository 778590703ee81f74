// v210 (10-bit 4:2:2): one group of six pixels (four 32-bit words) is the unit of a vertical run.
import { v210Stride } from '../decode'
import type { Kernel} from './kernel';
import { LITTLE_ENDIAN, Queue } from './kernel'
import { pairBatch, PairTables } from './pairs'

export function v210(data: Uint8Array, width: number, height: number, k: Kernel, stripe: number): PairTables {
  const tb = PairTables.for(1024, 512, 896, 0.25, k)
  const stride = v210Stride(width)
  // Rows start on 128-byte boundaries, so an aligned buffer can be read a word at a time.
  const words = LITTLE_ENDIAN && data.byteOffset % 4 === 0 ? new Int32Array(data.buffer, data.byteOffset, data.length >> 2) : undefined
  const groups = stripe / 6
  const keys = new Int32Array(groups * 4)
  const runs = new Int32Array(groups)
  const q = new Queue(stripe >> 1)
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const n = Math.min(stripe, width - x0)
    const ng = Math.ceil(n / 6)
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      let i = row * stride + (x0 / 6) * 16
      for (let g = 0; g < ng; g++, i += 16) {
        const ko = g * 4
        const run = runs[g]!
        if (!last) {
          let w0: number, w1: number, w2: number, w3: number
          if (words) {
            const j = i >> 2
            w0 = words[j]!; w1 = words[j + 1]!; w2 = words[j + 2]!; w3 = words[j + 3]!
          }
          else {
            w0 = data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)
            w1 = data[i + 4]! | (data[i + 5]! << 8) | (data[i + 6]! << 16) | (data[i + 7]! << 24)
            w2 = data[i + 8]! | (data[i + 9]! << 8) | (data[i + 10]! << 16) | (data[i + 11]! << 24)
            w3 = data[i + 12]! | (data[i + 13]! << 8) | (data[i + 14]! << 16) | (data[i + 15]! << 24)
          }
          if (run && w0 === keys[ko] && w1 === keys[ko + 1] && w2 === keys[ko + 2] && w3 === keys[ko + 3]) {
            runs[g] = run + 1
            continue
          }
          if (run) m = queueGroup(q, m, keys, ko, x0 + g * 6, width, run)
          keys[ko] = w0; keys[ko + 1] = w1; keys[ko + 2] = w2; keys[ko + 3] = w3
          runs[g] = 1
        }
        else {
          m = queueGroup(q, m, keys, ko, x0 + g * 6, width, run)
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}

/**
 * Queues the pairs of one v210 group: word order Cb0 Y0 Cr0 | Y1 Cb1 Y2 | Cr1 Y3 Cb2 | Y4 Cr2 Y5
 * (decode.ts); a group at the right edge may hold only two or four pixels of the picture.
 */
function queueGroup(q: Queue, m: number, keys: Int32Array, ko: number, x: number, width: number, run: number): number {
  const w0 = keys[ko]!; const w1 = keys[ko + 1]!; const w2 = keys[ko + 2]!; const w3 = keys[ko + 3]!
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  QX[m] = x; QCb[m] = w0 & 1023; QY0[m] = (w0 >>> 10) & 1023; QCr[m] = (w0 >>> 20) & 1023; QY1[m] = w1 & 1023; QN[m++] = run
  if (x + 2 < width) {
    QX[m] = x + 2; QCb[m] = (w1 >>> 10) & 1023; QY0[m] = (w1 >>> 20) & 1023; QCr[m] = w2 & 1023; QY1[m] = (w2 >>> 10) & 1023; QN[m++] = run
  }
  if (x + 4 < width) {
    QX[m] = x + 4; QCb[m] = (w2 >>> 20) & 1023; QY0[m] = w3 & 1023; QCr[m] = (w3 >>> 10) & 1023; QY1[m] = (w3 >>> 20) & 1023; QN[m++] = run
  }
  return m
}
