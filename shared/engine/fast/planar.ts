// Planar 4:2:2 Y'CbCr (8 or 10 bits; what clips are piped as, one plane each of Y', Cb, Cr):
// one pair of pixels — two luma codes and their Cb, Cr — is the unit of a vertical run.
// The pair's two luma samples are read as one word (two bytes, or two 16-bit samples) and
// its Cb and Cr packed into a second, so a repeat costs two integer compares, as a UYVY
// word costs one. A plane not on a word boundary (or a big-endian machine) takes the same
// route with the pair's luma put together from the samples.
import type { Kernel } from './kernel'
import { LITTLE_ENDIAN, Queue } from './kernel'
import { pairBatch, PairTables } from './pairs'

export function planar422(
  yP: Uint8Array | Uint16Array, cbP: Uint8Array | Uint16Array, crP: Uint8Array | Uint16Array,
  width: number, height: number, bitDepth: 8 | 10, k: Kernel, stripe: number,
): PairTables {
  // The same per-code tables as UYVY (8-bit) and v210 (10-bit): the reference reads a planar
  // sample by the same expressions ((code − centre)/span, code/div) as those packings.
  const tb = bitDepth === 8 ? PairTables.for(256, 128, 224, 1, k) : PairTables.for(1024, 512, 896, 0.25, k)
  // Bits of one luma sample in the pair word, and the mask of one.
  const shift = bitDepth === 8 ? 8 : 16
  const mask = (1 << shift) - 1
  const wordBytes = bitDepth === 8 ? 2 : 4
  const aligned = LITTLE_ENDIAN && yP.byteOffset % wordBytes === 0
  const words: Uint16Array | Uint32Array | null = !aligned ? null
    : bitDepth === 8 ? new Uint16Array(yP.buffer, yP.byteOffset, (width * height) >> 1) : new Uint32Array(yP.buffer, yP.byteOffset, (width * height) >> 1)
  const cw = width >> 1
  const pairs = stripe >> 1
  const keyY = new Int32Array(pairs)
  const keyC = new Int32Array(pairs)
  const runs = new Int32Array(pairs)
  const q = new Queue(pairs)
  const { x: QX, a: QCb, b: QCr, c: QY0, d: QY1, n: QN } = q
  for (let x0 = 0; x0 < width; x0 += stripe) {
    const np = Math.min(stripe, width - x0) >> 1
    runs.fill(0)
    for (let row = 0; row <= height; row++) {
      let m = 0
      const last = row === height
      // Pair index: the pair's first luma sample is 2·pi in the plane, its chroma sample ci.
      let pi = (row * width + x0) >> 1
      let ci = row * cw + (x0 >> 1)
      for (let j = 0; j < np; j++, pi++, ci++) {
        const run = runs[j]!
        if (!last) {
          const ky = words ? words[pi]! | 0 : (yP[2 * pi]! | (yP[2 * pi + 1]! << shift))
          const kc = cbP[ci]! | (crP[ci]! << 16)
          if (ky === keyY[j] && kc === keyC[j] && run) {
            runs[j] = run + 1
            continue
          }
          if (run) {
            const oy = keyY[j]!; const oc = keyC[j]!
            QX[m] = x0 + 2 * j; QY0[m] = oy & mask; QY1[m] = (oy >>> shift) & mask; QCb[m] = oc & 0xffff; QCr[m] = oc >>> 16; QN[m++] = run
          }
          keyY[j] = ky
          keyC[j] = kc
          runs[j] = 1
        }
        else {
          const oy = keyY[j]!; const oc = keyC[j]!
          QX[m] = x0 + 2 * j; QY0[m] = oy & mask; QY1[m] = (oy >>> shift) & mask; QCb[m] = oc & 0xffff; QCr[m] = oc >>> 16; QN[m++] = run
        }
      }
      q.len = m
      if (m) pairBatch(k, q, tb, row)
    }
  }
  return tb
}
