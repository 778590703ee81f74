// Pictures made by the tests themselves (never shipped data): deterministic patterns in
// every format Linewise reads, with a seed so that each call can give distinct content.
import sharp from 'sharp'
import { packV210 } from '../../shared/engine'

/** Small deterministic PRNG (mulberry32) so a seed always gives the same picture. */
export function rng(seed: number) {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** 8-bit RGB: a horizontal ramp, a band of saturated patches and seeded noise. */
export function pattern8(width: number, height: number, seed: number): Buffer {
  const r = rng(seed)
  const data = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const o = (y * width + x) * 3
      if (y < height / 3) {
        const v = Math.round((x / (width - 1)) * 255)
        data[o] = v; data[o + 1] = v; data[o + 2] = v
      } else if (y < (2 * height) / 3) {
        const k = Math.floor((x / width) * 6)
        data[o] = [255, 0, 0, 255, 0, 255][k]!; data[o + 1] = [255, 255, 255, 0, 0, 0][k]!; data[o + 2] = [0, 255, 0, 255, 255, 0][k]!
      } else {
        data[o] = Math.floor(r() * 256); data[o + 1] = Math.floor(r() * 256); data[o + 2] = Math.floor(r() * 256)
      }
    }
  }
  return data
}

export async function png8(width: number, height: number, seed: number) {
  return sharp(pattern8(width, height, seed), { raw: { width, height, channels: 3 } }).png({ compressionLevel: 1 }).toBuffer()
}

export async function png16(width: number, height: number, seed: number) {
  const r = rng(seed)
  const data = new Uint16Array(width * height * 3)
  for (let i = 0; i < data.length; i++) data[i] = Math.floor(r() * 65536)
  // sharp reads 16-bit raw input with `depth`, which its type declarations do not list yet.
  const raw = { width, height, channels: 3 as const, depth: 'ushort' }
  return sharp(Buffer.from(data.buffer), { raw })
    .toColourspace('rgb16').png({ compressionLevel: 1 }).toBuffer()
}

export async function still(format: 'jpeg' | 'tiff' | 'webp', width: number, height: number, seed: number) {
  const s = sharp(pattern8(width, height, seed), { raw: { width, height, channels: 3 } })
  if (format === 'jpeg') return s.jpeg({ quality: 90 }).toBuffer()
  if (format === 'tiff') return s.tiff().toBuffer()
  return s.webp({ lossless: true }).toBuffer()
}

/** 8-bit UYVY with seeded codes across the whole 1–254 range (sub-black and super-white kept). */
export function uyvy(width: number, height: number, seed: number): Buffer {
  const r = rng(seed)
  const data = Buffer.alloc(width * height * 2)
  for (let i = 0; i < data.length; i++) data[i] = 1 + Math.floor(r() * 254)
  return data
}

/** 10-bit v210 with seeded codes in 4–1019 (the legal sample range of BT.601 at 10 bits). */
export function v210(width: number, height: number, seed: number): Buffer {
  const r = rng(seed)
  const y = new Uint16Array(width * height)
  const c = new Uint16Array((width / 2) * height)
  const cr = new Uint16Array((width / 2) * height)
  for (let i = 0; i < y.length; i++) y[i] = 4 + Math.floor(r() * 1016)
  for (let i = 0; i < c.length; i++) { c[i] = 4 + Math.floor(r() * 1016); cr[i] = 4 + Math.floor(r() * 1016) }
  return Buffer.from(packV210(y, c, cr, width, height))
}
