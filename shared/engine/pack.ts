// Level distributions as compact JSON, so that every analysis can keep them and a spec can be
// judged again later without the pixels. Each distribution keeps only the span between its
// non-empty bins as varints (see packDist): a 1080p frame of camera grain packs to a few kB,
// a flat test pattern to a few bytes.
import { LEVEL_BINS, LEVEL_MIN, LEVEL_STEP } from './levels'
import type { LevelDistributions } from './types'

/**
 * The distributions a verdict reads (verdict.ts). The per-channel R', G', B' ones are not kept:
 * no limit reads them, and the coarse R, G, B histograms are stored beside the analysis.
 */
export const LEVEL_KEYS = ['luma', 'compMax', 'compMin', 'rgbMax', 'rgbMin', 'rgbMaxLp', 'rgbMinLp', 'lumaMaxR3', 'lumaMinR3', 'compMaxR3', 'compMinR3', 'rgbMaxR3', 'rgbMinR3'] as const
type LevelKey = typeof LEVEL_KEYS[number] | 'r' | 'g' | 'b'

/** `o`: index of the first bin the stream counts from; `d`: the varint stream in base64. */
export interface PackedDist { o: number, d: string }
export interface PackedLevels {
  v: 1
  min: number
  step: number
  bins: number
  dists: Partial<Record<LevelKey, PackedDist>>
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/'
const B64_INDEX = (() => {
  const t = new Int16Array(128).fill(-1)
  for (let i = 0; i < 64; i++) t[B64.charCodeAt(i)] = i
  return t
})()

// Our own base64 rather than Buffer or btoa: the engine runs unchanged in the browser and Node.
function toBase64(bytes: Uint8Array): string {
  let out = ''
  let i = 0
  for (; i + 2 < bytes.length; i += 3) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8) | bytes[i + 2]!
    out += B64[n >> 18]! + B64[(n >> 12) & 63]! + B64[(n >> 6) & 63]! + B64[n & 63]!
  }
  const rest = bytes.length - i
  if (rest === 1) {
    const n = bytes[i]! << 16
    out += `${B64[n >> 18]!}${B64[(n >> 12) & 63]!}==`
  }
  else if (rest === 2) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8)
    out += `${B64[n >> 18]!}${B64[(n >> 12) & 63]!}${B64[(n >> 6) & 63]!}=`
  }
  return out
}

function fromBase64(s: string): Uint8Array {
  if (s.length % 4 !== 0) throw new Error('packed levels: base64 length is not a multiple of 4')
  const pad = s.endsWith('==') ? 2 : s.endsWith('=') ? 1 : 0
  const out = new Uint8Array(s.length / 4 * 3 - pad)
  let o = 0
  for (let i = 0; i < s.length; i += 4) {
    let n = 0
    for (let k = 0; k < 4; k++) {
      const ch = s.charCodeAt(i + k)
      const v = ch === 61 ? 0 : ch < 128 ? B64_INDEX[ch]! : -1
      if (v < 0) throw new Error('packed levels: not base64')
      n = (n << 6) | v
    }
    if (o < out.length) out[o++] = (n >> 16) & 255
    if (o < out.length) out[o++] = (n >> 8) & 255
    if (o < out.length) out[o++] = n & 255
  }
  return out
}

/**
 * Non-empty bins as LEB128 varints, pairs of (bins skipped since the previous non-empty one,
 * count), in base64: a run of grain costs two or three bytes a bin, a flat test pattern a few
 * bytes in all.
 */
export function packDist(dist: Uint32Array): PackedDist {
  const bytes: number[] = []
  const put = (v: number) => {
    while (v >= 128) { bytes.push((v % 128) | 128); v = Math.floor(v / 128) }
    bytes.push(v)
  }
  let prev = -1
  for (let i = 0; i < dist.length; i++) {
    const c = dist[i]!
    if (c === 0) continue
    put(i - prev - 1)
    put(c)
    prev = i
  }
  return { o: 0, d: toBase64(Uint8Array.from(bytes)) }
}

export function unpackDist(p: PackedDist, bins: number): Uint32Array {
  const out = new Uint32Array(bins)
  if (!p.d) return out
  const bytes = fromBase64(p.d)
  let k = 0
  const get = () => {
    let v = 0
    let mul = 1
    for (;;) {
      if (k >= bytes.length) throw new Error('packed levels: a distribution ends inside a number')
      const b = bytes[k++]!
      v += (b & 127) * mul
      if (b < 128) return v
      mul *= 128
      if (mul > 2 ** 35) throw new Error('packed levels: a number is too long')
    }
  }
  let i = p.o - 1
  while (k < bytes.length) {
    i += get() + 1
    const c = get()
    if (i >= bins || c > 0xFFFFFFFF) throw new Error('packed levels: a distribution does not fit its bins')
    out[i] = c
  }
  return out
}

export function packLevels(lv: LevelDistributions): PackedLevels {
  const dists: PackedLevels['dists'] = {}
  for (const k of LEVEL_KEYS) {
    const d = lv[k]
    if (d) dists[k] = packDist(d)
  }
  return { v: 1, min: lv.min, step: lv.step, bins: lv.luma.length, dists }
}

/**
 * The distributions back, each decoded on first use: re-judging against a spec decodes only
 * those its limits read. R', G', B' per channel come back empty (not kept, see LEVEL_KEYS).
 */
export function unpackLevels(p: PackedLevels): LevelDistributions {
  if (p.v !== 1 || p.min !== LEVEL_MIN || p.step !== LEVEL_STEP || p.bins !== LEVEL_BINS) {
    throw new Error('packed levels: unknown layout')
  }
  const cache = new Map<LevelKey, Uint32Array | undefined>()
  const get = (k: LevelKey, required: boolean): Uint32Array | undefined => {
    if (!cache.has(k)) {
      const d = p.dists[k as typeof LEVEL_KEYS[number]]
      cache.set(k, d ? unpackDist(d, p.bins) : required ? new Uint32Array(p.bins) : undefined)
    }
    return cache.get(k)
  }
  const out = { min: p.min, step: p.step } as LevelDistributions
  for (const k of [...LEVEL_KEYS, 'r', 'g', 'b'] as const) {
    // The spatial ones are absent from analyses stored before they were measured.
    const required = ['luma', 'compMax', 'compMin', 'rgbMax', 'rgbMin', 'r', 'g', 'b'].includes(k)
    Object.defineProperty(out, k, { enumerable: true, get: () => get(k, required) })
  }
  return out
}
