// Synthetic 1080p frame grabs for the pipeline benchmark: smooth gradients and shapes
// with a little sensor-like noise, so PNG compresses them about as poorly as it does a
// real camera frame (a few MB each), and every frame differs (the server de-duplicates by
// content). Invented pictures, nothing taken from anywhere. ensurePhotoFrames cuts 1080p
// stills from real photographs instead (below).
import { spawnSync } from 'node:child_process'
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

/**
 * Real photographs for the benchmarks: camera pictures from Debian's mate-backgrounds
 * (GPL-2+, authors in /usr/share/doc/mate-backgrounds/copyright), installed with apt-get
 * when missing (root can on these machines).
 */
export const PHOTO_DIR = '/usr/share/backgrounds/mate/nature'
export const PHOTOS = ['Storm.jpg', 'Dune.jpg', 'Blinds.jpg', 'RainDrops.jpg', 'Wood.jpg', 'TwoWings.jpg']

export function ensurePhotos() {
  if (PHOTOS.every((f) => existsSync(join(PHOTO_DIR, f)))) return PHOTOS.map((f) => join(PHOTO_DIR, f))
  console.log("installing Debian's mate-backgrounds for the photographs…")
  const r = spawnSync('apt-get', ['install', '-y', '--no-install-recommends', 'mate-backgrounds'], { stdio: ['ignore', 'ignore', 'pipe'] })
  if (r.status !== 0 || !PHOTOS.every((f) => existsSync(join(PHOTO_DIR, f)))) {
    throw new Error(`the photographs need Debian's mate-backgrounds (apt-get install mate-backgrounds): ${r.error?.message ?? r.stderr?.toString().trim()}`)
  }
  return PHOTOS.map((f) => join(PHOTO_DIR, f))
}

/**
 * 1080p PNG stills cut from the photographs: frame i is photograph i mod 6, scaled to a
 * width of 1920–2400 and cropped at a place of its own, so every frame differs (the server
 * de-duplicates by content) and each is a real picture.
 */
export async function ensurePhotoFrames(dir, count) {
  const photos = ensurePhotos()
  mkdirSync(dir, { recursive: true })
  const paths = []
  for (let i = 0; i < count; i++) {
    const path = join(dir, `photo-${String(i).padStart(4, '0')}.png`)
    if (!existsSync(path) || statSync(path).size === 0) {
      const k = Math.floor(i / photos.length)
      const scaled = sharp(photos[i % photos.length]).resize({ width: WIDTH + 16 * (k % 31) })
      const { data, info } = await scaled.raw().toBuffer({ resolveWithObject: true })
      if (info.height < HEIGHT) throw new Error(`${photos[i % photos.length]} is too small for a ${WIDTH}×${HEIGHT} crop`)
      const left = (k * 37) % (info.width - WIDTH + 1)
      const top = (k * 23) % (info.height - HEIGHT + 1)
      await sharp(data, { raw: info }).extract({ left, top, width: WIDTH, height: HEIGHT }).png().toFile(path)
    }
    paths.push(path)
  }
  return paths
}
