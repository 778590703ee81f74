// Synthetic 1080p frame grabs for the pipeline benchmark: smooth gradients and shapes
// with a little sensor-like noise, so PNG compresses them about as poorly as it does a
// real camera frame (a few MB each), and every frame differs (the server de-duplicates by
// content). Invented pictures, nothing taken from anywhere.
import { existsSync, mkdirSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'
import sharp from 'sharp'

export const WIDTH = 1920
export const HEIGHT = 1080

/** RGB bytes of frame `i`: deterministic, so a cached set can be reused between runs. */
export function framePixels(i, width = WIDTH, height = HEIGHT) {
  const px = Buffer.alloc(width * height * 3)
  let seed = (i + 1) * 2654435761 >>> 0
  const cx = (i * 97) % width
  const cy = (i * 53) % height
  const r2 = (height / 4) ** 2
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      seed = (seed * 1664525 + 1013904223) >>> 0
      const n = (seed >>> 24) % 9 - 4
      const inDisc = (x - cx) ** 2 + (y - cy) ** 2 < r2
      const o = (y * width + x) * 3
      // A few frames run hot or crushed, so verdicts are not all the same.
      const lift = inDisc ? (i % 5 === 0 ? 250 : 180) : 0
      px[o] = clamp(((x * 200) / width) + lift * 0.3 + n + (i % 17))
      px[o + 1] = clamp(((y * 220) / height) + lift * 0.5 + n)
      px[o + 2] = clamp(((x + y) * 160) / (width + height) + lift * 0.2 + n + 20 * ((i >> 2) & 1))
    }
  }
  return px
}

const clamp = (v) => (v < 0 ? 0 : v > 255 ? 255 : v | 0)

/** Writes frames 0…count−1 as PNG into `dir` (skipping ones already there); returns the paths. */
export async function ensureFrames(dir, count) {
  mkdirSync(dir, { recursive: true })
  const paths = []
  for (let i = 0; i < count; i++) {
    const path = join(dir, `frame-${String(i).padStart(4, '0')}.png`)
    if (!existsSync(path) || statSync(path).size === 0) {
      // Default zlib level, as a grading app would export them.
      await sharp(framePixels(i), { raw: { width: WIDTH, height: HEIGHT, channels: 3 } }).png().toFile(path)
    }
    paths.push(path)
  }
  return paths
}

export const framesIn = (dir) => readdirSync(dir).filter((f) => f.endsWith('.png')).sort().map((f) => join(dir, f))
