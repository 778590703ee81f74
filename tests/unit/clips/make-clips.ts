// Clips made by Debian's ffmpeg own generators (lavfi `color`, `testsrc2`, `sine`, `geq`),
// written to a temporary folder for the test; nothing is written to the repository.
// Compared against: ffmpeg version 5.1.9-0+deb12u1 (Debian 12), `ffmpeg -version`.
import { execFile, execFileSync } from 'node:child_process'
import { promisify } from 'node:util'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

export function tempDir() {
  const dir = mkdtempSync(join(tmpdir(), 'lw-clips-'))
  return { dir, path: (name: string) => join(dir, name), remove: () => rmSync(dir, { recursive: true, force: true }) }
}

const FFMPEG = ['-hide_banner', '-v', 'error', '-nostdin', '-y', '-threads', '1']

export function ffmpegRun(args: string[]): Buffer {
  return execFileSync('ffmpeg', [...FFMPEG, ...args], { maxBuffer: 256 * 2 ** 20 })
}

/**
 * The same, leaving the event loop free: tests that talk HTTP use it, because a pooled
 * keep-alive connection closed by the server while the loop was blocked is only noticed
 * when the next request is written to it (EPIPE).
 */
export async function ffmpegRunAsync(args: string[]): Promise<void> {
  await promisify(execFile)('ffmpeg', [...FFMPEG, ...args], { maxBuffer: 256 * 2 ** 20 })
}

export interface Run { from: number, to: number, code10: number }

/**
 * Mid grey (10-bit code 505) with the given runs of frames set to a flat level (10-bit
 * codes), as uncompressed v210 in MOV (or lossless FFV1, far smaller): exact codes.
 */
type GreyClip = { rate: string, frames: number, runs: Run[], size?: string, timecode?: string, codec?: 'v210' | 'ffv1' }

function greyClipArgs(out: string, o: GreyClip): string[] {
  let expr = 'lum(X\\,Y)'
  for (const r of [...o.runs].reverse()) expr = `if(between(N\\,${r.from}\\,${r.to})\\,${r.code10}\\,${expr})`
  const size = o.size ?? '64x36'
  return [
    '-f', 'lavfi', '-i', `color=c=0x7e7e7e:s=${size}:r=${o.rate},format=yuv422p10le,geq=lum='${expr}':cb='cb(X\\,Y)':cr='cr(X\\,Y)'`,
    '-frames:v', String(o.frames), '-c:v', o.codec ?? 'v210', ...(o.timecode ? ['-timecode', o.timecode] : []), out,
  ]
}

export function greyClipWithRuns(out: string, o: GreyClip) {
  ffmpegRun(greyClipArgs(out, o))
}

export function greyClipWithRunsAsync(out: string, o: GreyClip): Promise<void> {
  return ffmpegRunAsync(greyClipArgs(out, o))
}
