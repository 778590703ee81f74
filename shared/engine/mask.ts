// The range mask: which blocks of the picture hold a pixel beyond the delivery spec's limits,
// gathered by the engine in the same pass as the statistics, on the same level bins as the
// verdict's shares (verdict.ts), so that what the overlay marks is exactly what the verdict
// counted. A block is what one pixel of the overlay image covers (at most 1280 wide by
// default), and a block is marked if any pixel in it is, so an isolated hot pixel is never
// lost to the downscaling.
import { fromScale } from './scales'
import type { LevelScale } from './scales'
import { firstBinAbove, lastBinBelow, LEVEL_BINS, LEVEL_MIN, LEVEL_STEP } from './levels'
import type { DeliverySpec } from './specs'
import type { RangeMask } from './types'

/** Mask bits: a pixel above a max limit, below a min limit. */
export const MASK_HIGH = 1
export const MASK_LOW = 2
/** The overlay's default width: the largest picture the frame page shows. */
export const MASK_DEFAULT_WIDTH = 1280

const NEVER = 1 << 30

/**
 * A spec's fail limits as level-bin indices: a pixel is above when its bin is at or past a
 * `…Hi` index and below when at or before a `…Lo` index. Chroma indices are those of the
 * padded Cb/Cr histograms (analyse.ts). Where a quantity has no limit on a side, the index
 * can never be reached.
 */
export interface MaskLimits {
  yHi: number, yLo: number, cHi: number, cLo: number, rgbHi: number, rgbLo: number
  cbHi: number, cbLo: number, crHi: number, crLo: number
}

export function maskLimits(spec: DeliverySpec, bins: number, pad: number): MaskLimits {
  const m: MaskLimits = { yHi: NEVER, yLo: -NEVER, cHi: NEVER, cLo: -NEVER, rgbHi: NEVER, rgbLo: -NEVER, cbHi: NEVER, cbLo: -NEVER, crHi: NEVER, crLo: -NEVER }
  const coarseStep = 256 / bins
  for (const l of spec.limits) {
    const t = fromScale(l.value, l.unit as LevelScale)
    if (l.quantity === 'cb' || l.quantity === 'cr') {
      // Coarse bin k = padded index − pad, clamped to 0…bins−1 (analyse.ts fold).
      let idx: number
      if (l.bound === 'max') {
        const first = firstBinAbove(0, coarseStep, t)
        idx = first > bins - 1 ? NEVER : first <= 0 ? -NEVER : first + pad
        if (l.quantity === 'cb') m.cbHi = Math.min(m.cbHi, idx); else m.crHi = Math.min(m.crHi, idx)
      }
      else {
        const last = lastBinBelow(0, coarseStep, t, bins)
        idx = last < 0 ? -NEVER : last >= bins - 1 ? NEVER : last + pad
        if (l.quantity === 'cb') m.cbLo = Math.max(m.cbLo, idx); else m.crLo = Math.max(m.crLo, idx)
      }
      continue
    }
    if (l.bound === 'max') {
      const first = firstBinAbove(LEVEL_MIN, LEVEL_STEP, t)
      if (l.quantity === 'luma') m.yHi = Math.min(m.yHi, first)
      else if (l.quantity === 'composite') m.cHi = Math.min(m.cHi, first)
      else m.rgbHi = Math.min(m.rgbHi, first)
    }
    else {
      const last = lastBinBelow(LEVEL_MIN, LEVEL_STEP, t, LEVEL_BINS)
      if (l.quantity === 'luma') m.yLo = Math.max(m.yLo, last)
      else if (l.quantity === 'composite') m.cLo = Math.max(m.cLo, last)
      else m.rgbLo = Math.max(m.rgbLo, last)
    }
  }
  return m
}

/** Overlay geometry: frame column x falls in mask column ⌊x·w/width⌋, likewise for rows. */
export function maskGeometry(width: number, height: number, maxWidth = MASK_DEFAULT_WIDTH): { width: number, height: number } {
  const w = Math.max(1, Math.min(width, Math.floor(maxWidth)))
  return { width: w, height: w === width ? height : Math.max(1, Math.round(height * w / width)) }
}

/**
 * The overlay layer: RGBA at the mask's size, transparent where nothing is marked and the
 * mark's colour (opaque) where a block is, above-limit marks winning over below-limit ones.
 * Laid over the picture by the frame page; mostly transparent, so its PNG is a few kB where
 * a painted copy of the picture was megabytes.
 */
export function renderMaskLayer(mask: RangeMask, high: readonly [number, number, number], low: readonly [number, number, number], into?: (bytes: number) => Uint8Array): Uint8Array {
  const { data } = mask
  const out = into ? into(data.length * 4) : new Uint8Array(data.length * 4)
  // A reused buffer holds the last layer: clear it, as a new one is.
  if (into) out.fill(0)
  for (let i = 0, o = 0; i < data.length; i++, o += 4) {
    const m = data[i]!
    if (m === 0) continue
    const c = m & MASK_HIGH ? high : low
    out[o] = c[0]; out[o + 1] = c[1]; out[o + 2] = c[2]; out[o + 3] = 255
  }
  return out
}
