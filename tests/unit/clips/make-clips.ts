// Clips made by Debian's ffmpeg own generators (lavfi `color`, `testsrc2`, `sine`, `geq`),
// written to a temporary folder for the test; nothing is written to the repository.
// Compared against: ffmpeg version 5.1.9-0+deb12u1 (Debian 12), `ffmpeg -version`.
import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

export function tempDir() {
  const dir = mkdtempSync(join(tmpdir(), 'lw-clips-'))
  return { dir, path: (name: string) => join(dir, name), remove: () => rmSync(dir, { recursive: true, force: true }) }
}

export function ffmpegRun(args: string[]): Buffer {
  return execFileSync('ffmpeg', ['-hide_banner', '-v', 'error', '-nostdin', '-y', '-threads', '1', ...args], { maxBuffer: 256 * 2 ** 20 })
}

export interface Run { from: number, to: number, code10: number }

/**
 * Mid grey (10-bit code 505) with the given runs of frames set to a flat level (10-bit
 * codes), as uncompressed v210 in MOV: exact codes, no compression in the way.
 */
export function greyClipWithRuns(out: string, o: { rate: string, frames: number, runs: Run[], size?: string, timecode?: string }) {
  let expr = 'lum(X\\,Y)'
  for (const r of [...o.runs].reverse()) expr = `if(between(N\\,${r.from}\\,${r.to})\\,${r.code10}\\,${expr})`
  const size = o.size ?? '64x36'
  ffmpegRun([
    '-f', 'lavfi', '-i', `color=c=0x7e7e7e:s=${size}:r=${o.rate},format=yuv422p10le,geq=lum='${expr}':cb='cb(X\\,Y)':cr='cr(X\\,Y)'`,
    '-frames:v', String(o.frames), '-c:v', 'v210', ...(o.timecode ? ['-timecode', o.timecode] : []), out,
  ])
}
