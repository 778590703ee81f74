// Random frames of every input kind the fast kernels read, shared by the tests that hold a
// fast route to its reference (fast.test.ts, spatial.test.ts).
import fc from 'fast-check'
import { packV210 } from '../../../shared/engine/index'
import type { FrameInput } from '../../../shared/engine/index'

/**
 * A frame whose rows are drawn from a few template rows with some samples changed, so runs
 * down a column start and end at varied places, as well as frames of pure noise. Widths reach
 * past the 96-pixel stripes and are not all multiples of six (partial v210 groups).
 */
export const shape = fc.record({
  w: fc.integer({ min: 1, max: 120 }).map(n => n * 2),
  h: fc.integer({ min: 1, max: 14 }),
  templates: fc.integer({ min: 1, max: 4 }),
  change: fc.constantFrom(0, 0.05, 0.3, 1),
  seed: fc.integer(),
})

export function sampler(seed: number) {
  let s = seed >>> 0
  return () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296
}

/** Sample index (row, i) → a code, from templates with changes. */
export function codes(h: number, perRow: number, templates: number, change: number, rnd: () => number, max: number): Int32Array {
  const t = Array.from({ length: templates }, () => Array.from({ length: perRow }, () => Math.floor(rnd() * (max + 1))))
  const out = new Int32Array(h * perRow)
  for (let row = 0; row < h; row++) {
    const tr = t[Math.floor(rnd() * templates)]!
    for (let i = 0; i < perRow; i++) out[row * perRow + i] = rnd() < change ? Math.floor(rnd() * (max + 1)) : tr[i]!
  }
  return out
}

export const kinds = fc.constantFrom('rgb3', 'rgb4', 'rgbStudio', 'uyvy', 'v210', 'planar8', 'planar10')

export function frameOf({ w, h, templates, change, seed }: { w: number, h: number, templates: number, change: number, seed: number }, kind: string): FrameInput {
  const rnd = sampler(seed)
  if (kind.startsWith('rgb')) {
    const ch = kind === 'rgb4' ? 4 : 3
    // Whole pixels come from the templates, so runs cover all three codes.
    const px = codes(h, w, templates, change, rnd, 0xffffff)
    const data = new Uint8Array(w * h * ch)
    for (let i = 0; i < w * h; i++) {
      data[i * ch] = px[i]! & 255; data[i * ch + 1] = (px[i]! >> 8) & 255; data[i * ch + 2] = px[i]! >> 16
      if (ch === 4) data[i * ch + 3] = Math.floor(rnd() * 256)
    }
    return { kind: 'rgb', data, width: w, height: h, channels: ch, bitDepth: 8, range: kind === 'rgbStudio' ? 'studio' : 'full' }
  }
  if (kind === 'uyvy') {
    const c = codes(h, w * 2, templates, change, rnd, 255)
    return { kind: 'uyvy', data: Uint8Array.from(c), width: w, height: h }
  }
  if (kind.startsWith('planar')) {
    // 4:2:2 planes as ffmpeg pipes a clip (yuv422p, yuv422p10le); a pair's four codes come
    // from the templates together, so runs cover the whole unit.
    const deep = kind === 'planar10'
    const max = deep ? 1023 : 255
    const pairs = codes(h, w / 2, templates, change, rnd, 2 ** 30 - 1)
    const y = deep ? new Uint16Array(w * h) : new Uint8Array(w * h)
    const cb = deep ? new Uint16Array(w * h / 2) : new Uint8Array(w * h / 2)
    const cr = deep ? new Uint16Array(w * h / 2) : new Uint8Array(w * h / 2)
    for (let i = 0; i < pairs.length; i++) {
      const p = pairs[i]!
      y[2 * i] = p & max; y[2 * i + 1] = (p >>> 10) & max; cb[i] = (p >>> 20) & max
      cr[i] = (Math.imul(p, 0x9e3779b1) >>> 20) & max
    }
    return { kind: 'planar', y, cb, cr, width: w, height: h, bitDepth: deep ? 10 : 8, subsampling: '422' }
  }
  const y = codes(h, w, templates, change, rnd, 1023)
  const cb = codes(h, w / 2, templates, change, rnd, 1023)
  const cr = codes(h, w / 2, templates, change, rnd, 1023)
  return { kind: 'v210', data: packV210(y, cb, cr, w, h), width: w, height: h }
}

