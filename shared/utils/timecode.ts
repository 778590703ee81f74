/**
 * SMPTE ST 12-1 time address (timecode) arithmetic: frame counts ↔ "HH:MM:SS:FF" labels.
 *
 * Non-drop labels count whole frames at the nominal rate (24, 25, 30, 50, 60). Drop-frame
 * labels (29.97 and 59.94 only) skip the frame numbers 00–01 (59.94: 00–03) at the start of
 * every minute except minutes 00, 10, 20, 30, 40 and 50, so the label stays within about
 * 2 frames a day of clock time; they are written with ';' before the frames
 * (SMPTE ST 12-1 drop-frame rule — memory; the arithmetic is checked against the published
 * examples in tests/unit/timecode.test.ts).
 *
 * Plain TypeScript with no imports: used by the worker, the server and the browser.
 */

/** A frame rate as an exact fraction, e.g. 30000/1001 for 29.97. */
export interface FrameRate { num: number, den: number }

/** The frame rates a reel or clip may declare, with their nominal (label) rate. */
export const FRAME_RATES = {
  '23.976': { num: 24000, den: 1001 },
  '24': { num: 24, den: 1 },
  '25': { num: 25, den: 1 },
  '29.97': { num: 30000, den: 1001 },
  '30': { num: 30, den: 1 },
  '50': { num: 50, den: 1 },
  '59.94': { num: 60000, den: 1001 },
  '60': { num: 60, den: 1 },
} as const satisfies Record<string, FrameRate>

export type FrameRateName = keyof typeof FRAME_RATES
export const FRAME_RATE_NAMES = Object.keys(FRAME_RATES) as FrameRateName[]

/** Frames per second as a number (29.97002997…). */
export function fps(rate: FrameRate): number {
  return rate.num / rate.den
}

/** The label rate: frames counted per labelled second (30 for 29.97, 24 for 23.976). */
export function nominalRate(rate: FrameRate): number {
  return Math.round(rate.num / rate.den)
}

/** Drop-frame labelling exists for 29.97 and 59.94 only (the 1001 rates of 30 and 60). */
export function canDropFrame(rate: FrameRate): boolean {
  const n = nominalRate(rate)
  return rate.den === 1001 && (n === 30 || n === 60)
}

/** The nearest named rate to a measured fraction (e.g. ffprobe's "30000/1001" or "2997/100"). */
export function nameFrameRate(rate: FrameRate): FrameRateName | null {
  const f = fps(rate)
  for (const name of FRAME_RATE_NAMES) {
    if (Math.abs(fps(FRAME_RATES[name]) - f) < 0.002) return name
  }
  return null
}

const pad = (n: number) => String(n).padStart(2, '0')

/**
 * The label of frame `frame` (0-based, counted from the label `start`, default 00:00:00:00).
 * `dropFrame` is honoured only where the rate allows it. Labels wrap after 24 hours.
 */
export function framesToTimecode(frame: number, rate: FrameRate, dropFrame = false, start = 0): string {
  if (!Number.isInteger(frame) || frame < 0) throw new RangeError(`frame must be a whole number ≥ 0, got ${frame}`)
  const n = nominalRate(rate)
  const drop = dropFrame && canDropFrame(rate)
  const perDay = drop ? dropFramesPerDay(n) : n * 86_400
  let f = (frame + start) % perDay
  if (drop) {
    const skip = n / 15 // 2 labels at 30, 4 at 60
    const perMinute = n * 60 - skip
    const perTen = n * 600 - 9 * skip
    const tens = Math.floor(f / perTen)
    const rest = f % perTen
    // The first minute of each ten keeps every label; the other nine drop `skip` each.
    const dropped = 9 * skip * tens + (rest < skip ? 0 : skip * Math.floor((rest - skip) / perMinute))
    f += dropped
  }
  const ff = f % n
  const s = Math.floor(f / n)
  return `${pad(Math.floor(s / 3600))}:${pad(Math.floor(s / 60) % 60)}:${pad(s % 60)}${drop ? ';' : ':'}${pad(ff)}`
}

/** Frames in 24 hours of drop-frame labels at label rate `n` (30 → 2 589 408). */
function dropFramesPerDay(n: number): number {
  const skip = n / 15
  return 24 * 6 * (n * 600 - 9 * skip)
}

export interface ParsedTimecode { h: number, m: number, s: number, f: number, dropFrame: boolean }

const TC = /^(\d{2})[:\-_.](\d{2})[:\-_.](\d{2})([:;.\-_])(\d{2})$/

/** Reads "HH:MM:SS:FF" (';' or '.' before the frames marks drop-frame); null when it is not one. */
export function parseTimecode(text: string): ParsedTimecode | null {
  const m = TC.exec(text.trim())
  if (!m) return null
  const [h, mi, s, f] = [m[1], m[2], m[3], m[5]].map(Number) as [number, number, number, number]
  if (h > 23 || mi > 59 || s > 59) return null
  return { h, m: mi, s, f, dropFrame: m[4] === ';' }
}

/**
 * The frame count of a label at a rate: the inverse of `framesToTimecode`. Throws a
 * RangeError for a label that cannot exist at that rate (frames ≥ the label rate, or a
 * label that drop-frame skips, such as 00:01:00;00).
 */
export function timecodeToFrames(label: string | ParsedTimecode, rate: FrameRate, dropFrame?: boolean): number {
  const tc = typeof label === 'string' ? parseTimecode(label) : label
  if (!tc) throw new RangeError(`"${String(label)}" is not a timecode (HH:MM:SS:FF)`)
  const n = nominalRate(rate)
  const drop = (dropFrame ?? tc.dropFrame) && canDropFrame(rate)
  if (tc.f >= n) throw new RangeError(`frame ${tc.f} does not exist at ${n} frames per second`)
  const minutes = tc.h * 60 + tc.m
  let frames = (minutes * 60 + tc.s) * n + tc.f
  if (drop) {
    const skip = n / 15
    if (tc.s === 0 && tc.f < skip && tc.m % 10 !== 0) {
      throw new RangeError(`${formatParsed(tc)} is skipped in drop-frame timecode`)
    }
    frames -= skip * (minutes - Math.floor(minutes / 10))
  }
  return frames
}

function formatParsed(tc: ParsedTimecode): string {
  return `${pad(tc.h)}:${pad(tc.m)}:${pad(tc.s)}${tc.dropFrame ? ';' : ':'}${pad(tc.f)}`
}

/** The label `frames` after a start label (a clip's or reel's first frame). */
export function offsetTimecode(startLabel: string, frames: number, rate: FrameRate, dropFrame?: boolean): string {
  const tc = parseTimecode(startLabel)
  if (!tc) throw new RangeError(`"${startLabel}" is not a timecode (HH:MM:SS:FF)`)
  const drop = (dropFrame ?? tc.dropFrame) && canDropFrame(rate)
  return framesToTimecode(frames, rate, drop, timecodeToFrames(tc, rate, drop))
}

/**
 * A timecode written into a file name, as cameras and editing systems export grabs:
 * "A003_01-00-12-05.png", "shot 01_00_12_05.tif", "reel2.01.00.12.05.png" or
 * "clip_01-00-59;29.png". The last such group in the name wins; null when there is none.
 */
export function timecodeFromFileName(name: string): ParsedTimecode | null {
  const base = name.replace(/\.[A-Za-z0-9]{1,5}$/, '')
  const re = /(?:^|[^\d])(\d{2}[:\-_.]\d{2}[:\-_.]\d{2}[:;.\-_]\d{2})(?=$|[^\d])/g
  let last: ParsedTimecode | null = null
  for (const m of base.matchAll(re)) {
    const tc = parseTimecode(m[1]!)
    if (tc) last = tc
  }
  return last
}

/** A label in the canonical form for its kind (':' non-drop, ';' drop-frame). */
export function formatTimecode(tc: ParsedTimecode): string {
  return formatParsed(tc)
}
