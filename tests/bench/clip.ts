// npm run bench:clip — whole clips, side by side in one run on this machine: Linewise's
// measurement of every frame (ffmpeg decode → planar Y'CbCr pipe → engine, as one chunk
// worker does it) against what a user would script instead:
//   ffmpeg -threads 2 -i clip -vf signalstats -f null -
// on 1080p25 10-bit 4:2:2 ProRes (422 profile) clips of camera-like grain and of clean
// graphics, 10 s each, and the grain clip looped to 60 s for the memory figure (peak RSS of
// the measuring process for 10 s against 60 s). Clips are made once with ffmpeg's
// generators and kept in the temp folder. Runs are taken in turns, the least wall time kept.
import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, mkdirSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

const DIR = join(tmpdir(), 'linewise-bench-clips')
const RUNS = Number(process.env.LW_BENCH_RUNS ?? 2)
mkdirSync(DIR, { recursive: true })

function make(name: string, source: string) {
  const out = join(DIR, name)
  if (!existsSync(out)) {
    console.log(`making ${name}…`)
    execFileSync('ffmpeg', ['-v', 'error', '-y', '-f', 'lavfi', '-i', source, '-t', '10', '-c:v', 'prores', '-profile:v', '2', '-pix_fmt', 'yuv422p10le', out])
  }
  return out
}
const grain10 = make('grain-10s.mov', 'testsrc2=s=1920x1080:r=25,noise=alls=12:allf=t')
const clean10 = make('clean-10s.mov', 'smptehdbars=s=1920x1080:r=25,drawbox=x=\'mod(t*200,1700)\':y=600:w=200:h=200:c=white:t=fill')
const grain60 = join(DIR, 'grain-60s.mov')
if (!existsSync(grain60)) execFileSync('ffmpeg', ['-v', 'error', '-y', '-stream_loop', '5', '-i', grain10, '-c', 'copy', grain60])

function signalstats(file: string): number {
  const t0 = performance.now()
  const r = spawnSync('ffmpeg', ['-v', 'error', '-nostdin', '-threads', '2', '-i', file, '-vf', 'signalstats', '-f', 'null', '-'])
  if (r.status !== 0) throw new Error(String(r.stderr))
  return performance.now() - t0
}
function linewise(file: string): { frames: number, wallMs: number, engineCpuMs: number, maxRssMB: number } {
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(import.meta.dirname, 'clip-measure.ts'), file], { encoding: 'utf8', maxBuffer: 64 * 2 ** 20 })
  if (r.status !== 0) throw new Error(`measuring ${file} failed (status ${r.status}, signal ${r.signal}): ${r.stderr || r.error?.message}`)
  return JSON.parse(r.stdout.trim().split('\n').pop()!)
}

const rows: string[] = []
for (const [label, file, real] of [['grain 10 s', grain10, 10], ['clean 10 s', clean10, 10], ['grain 60 s', grain60, 60]] as const) {
  let ff = Infinity
  let lw = { frames: 0, wallMs: Infinity, engineCpuMs: 0, maxRssMB: 0 }
  let rss = 0
  for (let i = 0; i < RUNS; i++) {
    ff = Math.min(ff, signalstats(file))
    const one = linewise(file)
    rss = Math.max(rss, one.maxRssMB)
    if (one.wallMs < lw.wallMs) lw = one
  }
  lw.maxRssMB = rss
  const fps = lw!.frames / (lw!.wallMs / 1000)
  rows.push([
    label.padEnd(11), String(lw!.frames).padStart(6), `${(lw!.wallMs / 1000).toFixed(1)} s`.padStart(9), `${(ff / 1000).toFixed(1)} s`.padStart(9),
    (lw!.wallMs / ff).toFixed(2).padStart(6), `${fps.toFixed(1)}`.padStart(7), `${(fps / 25).toFixed(2)}×`.padStart(8), `${lw!.maxRssMB.toFixed(0)} MB`.padStart(8),
  ].join('  '))
  void real
}
console.log(`\n1080p25 10-bit 4:2:2 ProRes 422, ${RUNS} runs each in turns (least wall time); ${execFileSync('ffmpeg', ['-version']).toString().split('\n')[0]}`)
console.log('clip         frames  Linewise  signalstats  ratio  frames/s  × real   peak RSS')
for (const r of rows) console.log(r)
console.log('ratio = Linewise wall ÷ `ffmpeg -threads 2 -i clip -vf signalstats -f null -` wall; × real = frames/s ÷ 25')
