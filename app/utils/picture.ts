// Mapping between the picture as shown and the frame's own lines.

/** The frame line (0 = top) under a click `offsetY` pixels down a picture shown `boxHeight` tall. */
export function lineAtOffset(offsetY: number, boxHeight: number, frameHeight: number): number {
  if (!(boxHeight > 0) || !(frameHeight > 0)) return 0
  const line = Math.floor((offsetY / boxHeight) * frameHeight)
  return Math.min(frameHeight - 1, Math.max(0, line))
}

/** Where a line's marker sits, as a percentage of the picture's height (centre of the line). */
export function lineMarkerPercent(line: number, frameHeight: number): number {
  return ((line + 0.5) / frameHeight) * 100
}

/** A `?line=` value that names a line of this frame, else null (a stale link must not fail). */
export function parseLineQuery(value: unknown, frameHeight: number): number | null {
  const raw = Array.isArray(value) ? value[0] : value
  if (typeof raw !== 'string' || !/^\d{1,6}$/.test(raw)) return null
  const n = Number(raw)
  return n < frameHeight ? n : null
}
