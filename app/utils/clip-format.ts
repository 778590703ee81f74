/** 75.2 → "1 min 15 s"; 4 → "4.0 s". */
export function formatDuration(s: number): string {
  if (s < 60) return `${s.toFixed(1)} s`
  const h = Math.floor(s / 3600)
  const m = Math.floor((s % 3600) / 60)
  const sec = Math.round(s % 60)
  return h ? `${h} h ${m} min` : `${m} min ${sec} s`
}
