// Level distributions: bins centred on multiples of a quarter code. The span −256…+512 holds
// every level an accepted input can reach: luma 0…256, composite Y ± 219·C with C ≤ 0.97 for
// any 10-bit Cb/Cr under either matrix (−213…+469), decoded R'G'B' of illegal Y'CbCr
// (Y' + 1.8556·Pb: −215…+472), and 16-bit studio-range R'G'B' (0…256).
export const LEVEL_MIN = -256
export const LEVEL_STEP = 0.25
export const LEVEL_BINS = 3072

/** The quarter-code bin of an 8-bit-equivalent level, clamped to the distribution's ends. */
export function levelBin(code8: number): number {
  const i = ((code8 - LEVEL_MIN) * 4 + 0.5) | 0
  return i < 0 ? 0 : i >= LEVEL_BINS ? LEVEL_BINS - 1 : i
}

/**
 * Nearest-rank percentile: the smallest level whose cumulative count reaches ⌈p·N⌉ (at least
 * one sample), read as the bin centre.
 */
export function percentile(dist: Uint32Array, n: number, p: number, min = LEVEL_MIN, step = LEVEL_STEP): number {
  const rank = Math.max(1, Math.ceil(p * n - 1e-9))
  let acc = 0
  for (let i = 0; i < dist.length; i++) {
    acc += dist[i]!
    if (acc >= rank) return min + i * step
  }
  return min + (dist.length - 1) * step
}

/** The first bin whose centre lies above `threshold` (0 if every bin's does). */
export function firstBinAbove(min: number, step: number, threshold: number): number {
  return Math.max(0, Math.floor((threshold - min) / step + 1e-9) + 1)
}

/** The last bin whose centre lies below `threshold` (capped at `bins` − 1; −1 if none). */
export function lastBinBelow(min: number, step: number, threshold: number, bins: number): number {
  return Math.min(bins - 1, Math.ceil((threshold - min) / step - 1e-9) - 1)
}

/** Share of samples whose bin centre lies above `threshold`. */
export function shareAbove(dist: Uint32Array, min: number, step: number, threshold: number, n: number): number {
  const first = firstBinAbove(min, step, threshold)
  let s = 0
  for (let i = first; i < dist.length; i++) s += dist[i]!
  return s / n
}

/** Share of samples whose bin centre lies below `threshold`. */
export function shareBelow(dist: Uint32Array, min: number, step: number, threshold: number, n: number): number {
  const last = lastBinBelow(min, step, threshold, dist.length)
  let s = 0
  for (let i = 0; i <= last; i++) s += dist[i]!
  return s / n
}
