// Where one frame's time goes inside the analyse job, step by step, on one thread: the
// worker's own code (decodeBytes, analyseFrame, renderFrameImages, encodeFrameLines) with a
// timer around each step, on the noisy 1080p PNGs the pipeline benchmark uploads. S3 and
// MariaDB are left out (the pipeline benchmark measures them in place).
// Run: npx tsx tests/bench/pipeline-steps.ts   (ROUNDS=n for more rounds; LW_BENCH_SOURCE=photos
// for stills cut from real photographs, as bench:pipeline uploads by default; LW_NO_SCRATCH=1
// to draw into new buffers each job, for comparison)
//
// Also prints the garbage collector's pauses per job (PerformanceObserver 'gc' entries on
// this thread, as each analysis thread of the worker has its own heap); target < 10 ms.
//
// CPU time (process.cpuUsage: every thread of the process, so libvips' own threads count)
// is the figure to compare: on a shared machine wall time mostly measures the neighbours,
// and even CPU time grows when a neighbour shares the core, so the least CPU a step took
// is printed beside the median.
// Not a test: the numbers vary with the machine and its load.
import { readFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { PerformanceObserver } from 'node:perf_hooks'
import sharp from 'sharp'
import { AnalysisScratch, analyseFrame, builtinSpec, DEFAULT_SPEC_NAME } from '../../shared/engine/index'
import { decodeBytes } from '../../server/lib/decode-file'
import { encodeFrameLines } from '../../server/lib/frame-lines'
import { configureSharp, renderFrameImages, type Step } from '../../workers/lib/frame-images'
import { ensurePhotoFrames, framePixels, HEIGHT, WIDTH } from './pipeline-frames.mjs'

const ROUNDS = Number(process.env.ROUNDS ?? 7)
// LW_NO_SCRATCH=1: every drawn image and the line data in new buffers, as before the worker reused them (for A/B).
const LW_NO_SCRATCH = process.env.LW_NO_SCRATCH === '1'
const PHOTOS = process.env.LW_BENCH_SOURCE === 'photos'
const photoPaths = PHOTOS ? await ensurePhotoFrames(join(tmpdir(), 'linewise-photo-frames'), ROUNDS + 1) : []
let gcMs = 0
new PerformanceObserver(list => { for (const e of list.getEntries()) gcMs += e.duration }).observe({ entryTypes: ['gc'] })
const gcPerJob: number[] = []
const tick = () => new Promise(r => setImmediate(r))
const spec = builtinSpec(DEFAULT_SPEC_NAME)!
const scratch = new AnalysisScratch()
// As each analysis thread of the worker does on start.
configureSharp()

const times = new Map<string, { wall: number[], cpu: number[] }>()
const step: Step = async (name, f) => {
  const cpu0 = process.cpuUsage()
  const t0 = performance.now()
  const r = await f()
  const wall = performance.now() - t0
  const cpu = process.cpuUsage(cpu0)
  const m = times.get(name) ?? { wall: [], cpu: [] }
  m.wall.push(wall)
  m.cpu.push((cpu.user + cpu.system) / 1000)
  times.set(name, m)
  return r
}

let sizes: Record<string, number> = {}
let pngBytes = 0
// Round 0 warms the JIT and libvips up and is not counted.
for (let i = 0; i <= ROUNDS; i++) {
  // Default zlib level, as the pipeline benchmark writes its frames (and a grading app would).
  const bytes = PHOTOS ? readFileSync(photoPaths[i]!) : await sharp(framePixels(i), { raw: { width: WIDTH, height: HEIGHT, channels: 3 } }).png().toBuffer()
  pngBytes = bytes.length
  // Collector entries arrive on a later tick: settle them before the job, so its pauses are its own.
  await tick()
  const gc0 = gcMs
  const input = await step('decode', () => decodeBytes(bytes, { range: 'full' }))
  // As the worker does: density buffers reused from frame to frame.
  const a = await step('engine', () => analyseFrame(input, { matrix: '601', spec, keepDensities: true, scratch }))
  // As the worker does: drawn images and line data into the same scratch.
  const images = await renderFrameImages(input, a, '601', step, LW_NO_SCRATCH ? undefined : scratch)
  const lines = await step('line data', () => encodeFrameLines(input, LW_NO_SCRATCH ? undefined : (n) => scratch.raw('line data', n)))
  if (i === ROUNDS) sizes = { ...Object.fromEntries(Object.entries(images).map(([k, v]) => [k, v.data.length])), lines: lines.length }
  await tick()
  if (i === 0) times.clear()
  else gcPerJob.push(gcMs - gc0)
}

const median = (v: number[]) => [...v].sort((a, b) => a - b)[v.length >> 1]!
const f = (n: number) => n.toFixed(1).padStart(8)
console.log(`${WIDTH}×${HEIGHT} ${PHOTOS ? 'photograph' : 'noisy'} PNG (${(pngBytes / 1e6).toFixed(1)} MB), ${ROUNDS} rounds, ms per step:`)
console.log(`  ${'step'.padEnd(28)} ${'wall med'.padStart(8)} ${'CPU med'.padStart(8)} ${'CPU min'.padStart(8)}`)
const sum = { wall: 0, cpu: 0, cpuMin: 0, outside: 0, outsideMin: 0 }
for (const [k, v] of times) {
  const w = median(v.wall)
  const c = median(v.cpu)
  const cMin = Math.min(...v.cpu)
  sum.wall += w
  sum.cpu += c
  sum.cpuMin += cMin
  if (k !== 'engine') { sum.outside += c; sum.outsideMin += cMin }
  console.log(`  ${k.padEnd(28)} ${f(w)} ${f(c)} ${f(cMin)}`)
}
console.log(`  ${'total'.padEnd(28)} ${f(sum.wall)} ${f(sum.cpu)} ${f(sum.cpuMin)}`)
console.log(`  ${'CPU outside the engine'.padEnd(28)} ${''.padStart(8)} ${f(sum.outside)} ${f(sum.outsideMin)}`)
console.log('output bytes:', sizes)
console.log(`garbage collection per job: median ${median(gcPerJob).toFixed(1)} ms, most ${Math.max(...gcPerJob).toFixed(1)} ms (target < 10 ms${Math.max(...gcPerJob) < 10 ? ', met' : ', NOT met'})`)
