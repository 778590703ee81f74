// Pure helpers for the clip panel (unit-tested): the chart's series from a decoded timeline,
// and the next/previous event from a position.
import { toScale } from '../../shared/engine/scales'
import type { Timeline } from '../../shared/utils/clip-timeline'

export interface ClipSeries {
  /** Frame numbers along the horizontal axis. */
  x: number[]
  lumaMin: number[]
  lumaMax: number[]
  lumaMean: number[]
  compMin: number[]
  compMax: number[]
}

/**
 * The timeline in IRE, thinned to at most `points` columns: each column keeps the lowest
 * minimum and highest maximum of the frames it stands for, so no excursion is lost to
 * thinning (a one-frame flash still shows on a one-hour programme).
 */
export function clipSeries(t: Timeline, points = 2000): ClipSeries {
  const step = Math.max(1, Math.ceil(t.frames / points))
  const out: ClipSeries = { x: [], lumaMin: [], lumaMax: [], lumaMean: [], compMin: [], compMax: [] }
  const c = t.columns
  for (let i = 0; i < t.frames; i += step) {
    const end = Math.min(t.frames, i + step)
    let lmin = Infinity, lmax = -Infinity, cmin = Infinity, cmax = -Infinity, mean = 0
    for (let j = i; j < end; j++) {
      lmin = Math.min(lmin, c.lumaMin[j]!)
      lmax = Math.max(lmax, c.lumaMax[j]!)
      cmin = Math.min(cmin, c.compMin[j]!)
      cmax = Math.max(cmax, c.compMax[j]!)
      mean += c.lumaMean[j]!
    }
    const r = (v: number) => Math.round(toScale(v, 'ire') * 10) / 10
    out.x.push(i)
    out.lumaMin.push(r(lmin))
    out.lumaMax.push(r(lmax))
    out.lumaMean.push(r(mean / (end - i)))
    out.compMin.push(r(cmin))
    out.compMax.push(r(cmax))
  }
  return out
}

/** Index of the next (dir 1) or previous (dir −1) event from `current` (−1: none chosen), or null at the end. */
export function stepEvent(count: number, current: number, dir: 1 | -1): number | null {
  if (!count) return null
  if (current < 0) return dir === 1 ? 0 : count - 1
  const next = current + dir
  return next < 0 || next >= count ? null : next
}
