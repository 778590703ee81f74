// A clip's timeline: one record per frame, stored as one columnar binary object per clip,
// and the events (runs of frames beyond the spec) found in it. Plain TypeScript with no
// Node-only or browser-only imports: the worker writes it, the browser reads it.
import { fromScale, toScale, type LevelScale } from '../engine/scales'
import type { DeliverySpec, SpecLimit } from '../engine/specs'
import type { FrameAnalysis, Verdict } from '../engine/types'

/** Float32 columns, all levels as 8-bit-equivalent codes (convert with toScale). */
export const TIMELINE_COLUMNS = [
  'lumaMin', 'lumaMax', 'lumaMean', 'compMin', 'compMax', 'cbMin', 'cbMax', 'crMin', 'crMax', 'rgbMin', 'rgbMax',
  'gamutShare', 'outShare',
] as const
export type TimelineColumn = (typeof TIMELINE_COLUMNS)[number]

export interface Timeline {
  frames: number
  columns: Record<TimelineColumn, Float32Array>
  /** 0 pass, 1 caution, 2 fail. */
  verdict: Uint8Array
  /** Bit i set: the spec's limit i failed (caution) on this frame. */
  failMask: Uint32Array
  cautionMask: Uint32Array
}

export const VERDICT_CODES: Verdict[] = ['pass', 'caution', 'fail']

export function emptyTimeline(frames: number): Timeline {
  const columns = {} as Record<TimelineColumn, Float32Array>
  for (const c of TIMELINE_COLUMNS) columns[c] = new Float32Array(frames)
  return { frames, columns, verdict: new Uint8Array(frames), failMask: new Uint32Array(frames), cautionMask: new Uint32Array(frames) }
}

function extremeOf(dist: Uint32Array, min: number, step: number, top: boolean): number {
  if (top) { for (let i = dist.length - 1; i >= 0; i--) if (dist[i]) return min + i * step }
  else { for (let i = 0; i < dist.length; i++) if (dist[i]) return min + i * step }
  return NaN
}

/** Writes one frame's analysis into row `i`; the spec's limit order gives the mask bits. */
export function recordFrame(t: Timeline, i: number, a: FrameAnalysis, spec: DeliverySpec) {
  const c = t.columns
  const lv = a.histograms.levels
  c.lumaMin[i] = a.luma.min
  c.lumaMax[i] = a.luma.max
  c.lumaMean[i] = a.luma.mean
  c.compMin[i] = fromScale(a.compositeIre.min, 'ire')
  c.compMax[i] = fromScale(a.compositeIre.max, 'ire')
  c.cbMin[i] = a.chroma.cbMin
  c.cbMax[i] = a.chroma.cbMax
  c.crMin[i] = a.chroma.crMin
  c.crMax[i] = a.chroma.crMax
  c.rgbMin[i] = extremeOf(lv.rgbMin, lv.min, lv.step, false)
  c.rgbMax[i] = extremeOf(lv.rgbMax, lv.min, lv.step, true)
  c.gamutShare[i] = a.shares.gamutOut
  c.outShare[i] = Math.max(a.shares.belowBlack, a.shares.aboveWhite, a.shares.compositeOut, a.shares.gamutOut)
  t.verdict[i] = VERDICT_CODES.indexOf(a.verdict)
  let fail = 0
  let caution = 0
  for (const r of a.reasons) {
    const bit = spec.limits.findIndex((l) => l.id === r.limit)
    if (bit < 0 || bit > 31) continue
    if (r.severity === 'fail') fail |= 1 << bit
    else caution |= 1 << bit
  }
  t.failMask[i] = fail >>> 0
  t.cautionMask[i] = caution >>> 0
}

/** Rows [start, start + part.frames) of `into` from `part` (merging chunks). */
export function copyTimeline(into: Timeline, part: Timeline, start: number) {
  for (const c of TIMELINE_COLUMNS) into.columns[c].set(part.columns[c], start)
  into.verdict.set(part.verdict, start)
  into.failMask.set(part.failMask, start)
  into.cautionMask.set(part.cautionMask, start)
}

/** Only the first `frames` rows (a truncated clip ends where its decoding broke). */
export function sliceTimeline(t: Timeline, frames: number): Timeline {
  const out = emptyTimeline(frames)
  for (const c of TIMELINE_COLUMNS) out.columns[c].set(t.columns[c].subarray(0, frames))
  out.verdict.set(t.verdict.subarray(0, frames))
  out.failMask.set(t.failMask.subarray(0, frames))
  out.cautionMask.set(t.cautionMask.subarray(0, frames))
  return out
}

const MAGIC = 0x4c57544c // "LWTL"
const FORMAT_VERSION = 1
const HEADER_BYTES = 16

/**
 * Layout (little-endian): magic u32, format version u16, column count u16, frames u32,
 * reserved u32; then each Float32 column in TIMELINE_COLUMNS order, the fail and caution
 * masks (u32 columns), the verdicts (u8 column). 61 bytes a frame: a one-hour programme at
 * 25 fps is 5.5 MB, fetched in one request.
 */
export function encodeTimeline(t: Timeline): Uint8Array {
  const n = t.frames
  const bytes = new Uint8Array(HEADER_BYTES + n * (TIMELINE_COLUMNS.length * 4 + 8 + 1))
  const view = new DataView(bytes.buffer)
  view.setUint32(0, MAGIC, true)
  view.setUint16(4, FORMAT_VERSION, true)
  view.setUint16(6, TIMELINE_COLUMNS.length, true)
  view.setUint32(8, n, true)
  let at = HEADER_BYTES
  const put = (arr: Float32Array | Uint32Array | Uint8Array) => {
    const src = new Uint8Array(arr.buffer, arr.byteOffset, arr.byteLength)
    if (!littleEndian() && arr.BYTES_PER_ELEMENT > 1) throw new Error('timeline encoding needs a little-endian machine')
    bytes.set(src, at)
    at += src.byteLength
  }
  for (const c of TIMELINE_COLUMNS) put(t.columns[c])
  put(t.failMask)
  put(t.cautionMask)
  put(t.verdict)
  return bytes
}

export function decodeTimeline(bytes: Uint8Array): Timeline {
  if (bytes.byteLength < HEADER_BYTES) throw new Error('not a timeline: too short')
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  if (view.getUint32(0, true) !== MAGIC) throw new Error('not a timeline: wrong magic')
  if (view.getUint16(4, true) !== FORMAT_VERSION) throw new Error(`timeline format ${view.getUint16(4, true)} is not known`)
  if (view.getUint16(6, true) !== TIMELINE_COLUMNS.length) throw new Error('timeline column count differs')
  const n = view.getUint32(8, true)
  if (bytes.byteLength !== HEADER_BYTES + n * (TIMELINE_COLUMNS.length * 4 + 9)) throw new Error('timeline length does not match its frame count')
  // Copied so that every column is aligned whatever the source buffer's offset.
  const copy = bytes.slice(HEADER_BYTES)
  const t = emptyTimeline(n)
  let at = 0
  for (const c of TIMELINE_COLUMNS) { t.columns[c].set(new Float32Array(copy.buffer, at, n)); at += n * 4 }
  t.failMask.set(new Uint32Array(copy.buffer, at, n)); at += n * 4
  t.cautionMask.set(new Uint32Array(copy.buffer, at, n)); at += n * 4
  t.verdict.set(copy.subarray(at, at + n))
  return t
}

function littleEndian() {
  return new Uint8Array(new Uint16Array([1]).buffer)[0] === 1
}

/** Gaps of passing frames shorter than this are bridged: a flicker is one event, not many. */
export const EVENT_BRIDGE_FRAMES = 3

export interface LimitWorst {
  limit: string
  label: string
  severity: 'fail' | 'caution'
  /** The most extreme value over the event, in the limit's unit. */
  value: number
  unit: string
  threshold: number
  /** The frame (0-based in the clip) where it was reached. */
  frame: number
}

export interface ClipEvent {
  /** First and last frame (0-based, inclusive). */
  start: number
  end: number
  verdict: 'fail' | 'caution'
  limits: LimitWorst[]
  /** The frame furthest beyond any broken limit (in 8-bit-equivalent codes). */
  worstFrame: number
}

function limitColumn(l: SpecLimit): TimelineColumn {
  const max = l.bound === 'max'
  switch (l.quantity) {
    case 'luma': return max ? 'lumaMax' : 'lumaMin'
    case 'composite': return max ? 'compMax' : 'compMin'
    case 'rgb': return max ? 'rgbMax' : 'rgbMin'
    case 'cb': return max ? 'cbMax' : 'cbMin'
    case 'cr': return max ? 'crMax' : 'crMin'
  }
}

/**
 * Runs of failing or caution frames, a gap shorter than `bridge` passing frames joined into
 * the run. Each event names every limit broken in it with its most extreme value and frame.
 */
export function findEvents(t: Timeline, spec: DeliverySpec, bridge = EVENT_BRIDGE_FRAMES): ClipEvent[] {
  const runs: [number, number][] = []
  let open = -1
  let last = -1
  for (let i = 0; i < t.frames; i++) {
    if (t.verdict[i] === 0) continue
    if (open >= 0 && i - last - 1 < bridge) { last = i; continue }
    if (open >= 0) runs.push([open, last])
    open = i
    last = i
  }
  if (open >= 0) runs.push([open, last])
  return runs.map(([start, end]) => describeRun(t, spec, start, end))
}

function describeRun(t: Timeline, spec: DeliverySpec, start: number, end: number): ClipEvent {
  let verdict: 'fail' | 'caution' = 'caution'
  let worstFrame = start
  let worstExcess = -Infinity
  const limits: LimitWorst[] = []
  spec.limits.forEach((l, bit) => {
    if (bit > 31) return
    const col = t.columns[limitColumn(l)]
    const sign = l.bound === 'max' ? 1 : -1
    const thresholdCode = fromScale(l.value, l.unit as LevelScale)
    let found = -1
    let severity: 'fail' | 'caution' = 'caution'
    for (let i = start; i <= end; i++) {
      const failed = (t.failMask[i]! >>> bit) & 1
      const cautioned = (t.cautionMask[i]! >>> bit) & 1
      if (!failed && !cautioned) continue
      if (failed) severity = 'fail'
      if (found < 0 || sign * (col[i]! - col[found]!) > 0) found = i
      const excess = sign * (col[i]! - thresholdCode)
      if (excess > worstExcess) { worstExcess = excess; worstFrame = i }
    }
    if (found < 0) return
    if (severity === 'fail') verdict = 'fail'
    limits.push({
      limit: l.id, label: l.label, severity, value: toScale(col[found]!, l.unit as LevelScale), unit: l.unit,
      threshold: l.value, frame: found,
    })
  })
  return { start, end, verdict, limits, worstFrame }
}
