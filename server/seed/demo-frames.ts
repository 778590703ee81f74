// Synthetic pictures for the demo, drawn here from formulas: colour bars from the BT.601
// equations, and invented scenes (a dusk harbour, a hot sky, crushed shadows). Some pass,
// some fail, so that a new user sees every screen working at once.
import sharp from 'sharp'

type Px = (x: number, y: number) => [number, number, number]

function draw(width: number, height: number, px: Px) {
  const data = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const [r, g, b] = px(x / width, y / height)
      const o = (y * width + x) * 3
      data[o] = Math.max(0, Math.min(255, Math.round(r)))
      data[o + 1] = Math.max(0, Math.min(255, Math.round(g)))
      data[o + 2] = Math.max(0, Math.min(255, Math.round(b)))
    }
  }
  return sharp(data, { raw: { width, height, channels: 3 } }).png({ compressionLevel: 6 }).toBuffer()
}

const mix = (a: number, b: number, t: number) => a + (b - a) * Math.max(0, Math.min(1, t))
const noise = (x: number, y: number) => (Math.sin(x * 12.9898 + y * 78.233) * 43758.5453) % 1

/** Seven bars at `level` of full scale (0.75 or 1.0) in full-range R'G'B': white, yellow, cyan, green, magenta, red, blue. */
function bars(level: number): Px {
  const v = 255 * level
  const colours: [number, number, number][] = [[v, v, v], [v, v, 0], [0, v, v], [0, v, 0], [v, 0, v], [v, 0, 0], [0, 0, v]]
  return (x, y) => (y < 0.75 ? colours[Math.min(6, Math.floor(x * 7))]! : x < 0.25 ? [0, 0, 0] : x < 0.5 ? [255, 255, 255] : [0, 0, 0])
}

/** Dusk over a harbour: graded sky, dark water with lamp reflections; levels inside the spec. */
const duskHarbour: Px = (x, y) => {
  if (y < 0.55) {
    const t = y / 0.55
    return [mix(200, 70, t), mix(120, 60, t), mix(90, 110, t)]
  }
  const shimmer = Math.abs(x - 0.62) < 0.02 && noise(x, y) > 0.3 ? 90 : 0
  return [30 + shimmer, 38 + shimmer * 0.8, 52 + shimmer * 0.4]
}

/** Saturated signage at night: pure yellow and cyan neon push the composite envelope past +120 IRE. */
const neonSigns: Px = (x, y) => {
  const bg: [number, number, number] = [20, 18, 26]
  if (y > 0.3 && y < 0.45 && x > 0.1 && x < 0.45) return [255, 255, 0]
  if (y > 0.55 && y < 0.7 && x > 0.5 && x < 0.9) return [0, 255, 255]
  return bg
}

/** A street under sodium lamps: the saturated amber glow lands inside the composite warning margin. */
const sodiumStreet: Px = (x, y) => {
  const d = Math.min(Math.hypot(x - 0.25, y - 0.3), Math.hypot(x - 0.7, y - 0.25))
  if (d < 0.06) return [245, 225, 30]
  if (y > 0.7) return [mix(40, 70, x), mix(34, 55, x), 24]
  return [mix(90, 30, d * 3), mix(75, 25, d * 3), mix(20, 30, d * 3)]
}

/** A wide shot whose shadows were pulled below black in the grade (for a studio-range reel: codes under 16). */
const crushedShadows: Px = (x, y) => {
  if (y > 0.6) return [6 + 10 * x, 6 + 10 * x, 8 + 10 * x]
  return [mix(60, 150, y / 0.6), mix(70, 150, y / 0.6), mix(80, 160, y / 0.6)]
}

/** Overcast sky blown past white (for a studio-range reel: codes 236–250 are super-white). */
const hotSky: Px = (x, y) => {
  if (y < 0.45) return [mix(250, 236, y / 0.45), mix(250, 236, y / 0.45), 250]
  return [mix(90, 120, x), mix(100, 110, x), 70]
}

/** Interior with a practical lamp: a small specular patch at studio white, otherwise mid-tones. */
const interiorLamp: Px = (x, y) => {
  const d = Math.hypot(x - 0.3, y - 0.35)
  if (d < 0.03) return [235, 235, 235]
  return [mix(150, 70, d * 1.5), mix(110, 55, d * 1.5), mix(80, 45, d * 1.5)]
}

export interface DemoFrame { name: string; png: () => Promise<Buffer> }
export interface DemoReel { name: string; sourceLabel: string; sourceRange: 'full' | 'studio'; frames: DemoFrame[] }

const W = 960
const H = 540

export const DEMO_REELS: DemoReel[] = [
  {
    name: 'Day 1 — Camera A', sourceLabel: 'Camera A', sourceRange: 'full',
    frames: [
      { name: 'A001_bars-75.png', png: () => draw(W, H, bars(0.75)) },
      { name: 'A014_dusk-harbour.png', png: () => draw(W, H, duskHarbour) },
      { name: 'A022_neon-signs.png', png: () => draw(W, H, neonSigns) },
      { name: 'A027_sodium-street.png', png: () => draw(W, H, sodiumStreet) },
      { name: 'A031_bars-100.png', png: () => draw(W, H, bars(1)) },
    ],
  },
  {
    name: 'Day 1 — Camera B', sourceLabel: 'Camera B', sourceRange: 'studio',
    frames: [
      { name: 'B003_interior-lamp.png', png: () => draw(W, H, interiorLamp) },
      { name: 'B007_hot-sky.png', png: () => draw(W, H, hotSky) },
      { name: 'B012_crushed-shadows.png', png: () => draw(W, H, crushedShadows) },
    ],
  },
]
