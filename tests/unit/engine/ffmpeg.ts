// Runs Debian's ffmpeg as an independent implementation. Compared against:
// ffmpeg version 5.1.9-0+deb12u1 (Debian 12), `ffmpeg -version`.
// One thread, raw data through pipes, nothing written to the repository.
import { execFileSync } from 'node:child_process'

const FFMPEG = process.env.FFMPEG ?? 'ffmpeg'

export function ffmpeg(args: string[], input?: Uint8Array): Buffer {
  return execFileSync(FFMPEG, ['-hide_banner', '-v', 'error', '-nostdin', '-threads', '1', '-filter_threads', '1', ...args], {
    input, maxBuffer: 256 * 1024 * 1024, stdio: [input ? 'pipe' : 'ignore', 'pipe', 'pipe'],
  })
}

/** One frame of a lavfi source, as raw data in the given pixel format (or v210 packing). */
export function generate(source: string, pixFmt: string): Buffer {
  if (pixFmt === 'v210') return ffmpeg(['-f', 'lavfi', '-i', source, '-frames:v', '1', '-c:v', 'v210', '-f', 'rawvideo', '-'])
  return ffmpeg(['-f', 'lavfi', '-i', source, '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', pixFmt, '-'])
}

export type SignalStats = Record<string, number>

/** signalstats (with the BRNG test) of a raw frame fed on stdin, parsed from `metadata=print`. */
export function signalstats(raw: Uint8Array, pixFmt: string, width: number, height: number, preFilter = ''): SignalStats {
  // v210 is a codec in ffmpeg, read through its own demuxer and decoder.
  const input = pixFmt === 'v210' ? ['-f', 'v210'] : ['-f', 'rawvideo', '-pix_fmt', pixFmt]
  const out = ffmpeg([
    ...input, '-s', `${width}x${height}`, '-i', '-',
    '-vf', `${preFilter}signalstats=stat=brng,metadata=print:file=-`, '-f', 'null', '-',
  ], raw).toString('utf8')
  const stats: SignalStats = {}
  for (const m of out.matchAll(/lavfi\.signalstats\.([A-Z]+)=([-\d.e+]+)/g)) stats[m[1]!] = Number(m[2])
  if (stats.YMIN === undefined) throw new Error(`signalstats printed nothing:\n${out}`)
  return stats
}

export function ffmpegVersion(): string {
  return ffmpeg(['-version']).toString('utf8').split('\n')[0]!
}
