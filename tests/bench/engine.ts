// npm run bench — the measurement engine against ffmpeg (one thread) on the same frames:
// test patterns, camera-like grain, uniform noise and real photographs (Debian's
// mate-backgrounds, installed with apt-get when missing), at 1080p and SD, 8- and 16-bit.
// Prints CPU ms per frame for both and the ratios against their targets: with densities
// ≤ 1.0 × ffmpeg's signalstats + waveform + vectorscope on every class and ≤ 0.5 × on
// photographs and grain; statistics alone ≤ 0.5 × ffmpeg's signalstats alone. Also prints
// what analysing one frame allocates against the frame's raw size (target ≤ about 3 ×).
// Not a test: numbers vary with the machine and its load, so only the ratios, measured side
// by side in turns, are worth comparing between runs.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import v8 from 'node:v8'
import vm from 'node:vm'
import sharp from 'sharp'
import { analyseFrame, ENGINE_VERSION, packV210 } from '../../shared/engine/index'
import type { FrameAnalysis, FrameInput } from '../../shared/engine/index'

v8.setFlagsFromString('--expose-gc')
const gc = vm.runInNewContext('gc') as () => void

const FFMPEG = process.env.FFMPEG ?? 'ffmpeg'
const ONE_THREAD = ['-threads', '1', '-filter_threads', '1', '-filter_complex_threads', '1']
const dir = mkdtempSync(join(tmpdir(), 'linewise-bench-'))

function ffmpeg(args: string[]): { stdout: Buffer, stderr: string } {
  const r = spawnSync(FFMPEG, ['-hide_banner', '-nostdin', ...ONE_THREAD, ...args], { maxBuffer: 512 * 1024 * 1024 })
  if (r.error) throw new Error(`cannot run ${FFMPEG}: ${r.error.message}`)
  if (r.status !== 0) throw new Error(`ffmpeg failed: ${r.stderr.toString()}`)
  return { stdout: r.stdout, stderr: r.stderr.toString() }
}

/**
 * ffmpeg's own CPU time (-benchmark utime + stime), in ms. CPU time rather than wall time on
 * both sides: on a shared machine wall time mostly measures the neighbours.
 */
function ffmpegCpuMs(args: string[]): number {
  const { stderr } = ffmpeg(['-benchmark', '-nostats', '-v', 'info', ...args])
  const m = /utime=([\d.]+)s stime=([\d.]+)s/.exec(stderr)
  if (!m) throw new Error(`no -benchmark figure in:\n${stderr}`)
  return (Number(m[1]) + Number(m[2])) * 1000
}

type CaseClass = 'pattern' | 'grain' | 'noise' | 'photo'

interface Case {
  label: string
  cls: CaseClass
  width: number
  height: number
  ffPixFmt: string
  rawFile: string
  rawBytes: number
  input: FrameInput
}

/**
 * A frame of uniform noise, every pixel unlike its neighbours. testsrc2 is mostly flat bars,
 * which the engine's run coalescing folds; noise shows the cost when nothing repeats, as in
 * grainy camera footage. ffmpeg's filters take the same time on either.
 */
function makeNoiseCase(width: number, height: number, kind: 'rgb8' | 'yuv10'): Case {
  let s = 12345
  const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0)
  if (kind === 'rgb8') {
    const raw = new Uint8Array(width * height * 3).map(() => next() >>> 24)
    const rawFile = join(dir, `noise-rgb-${width}.raw`)
    writeFileSync(rawFile, raw)
    return {
      label: `${width}×${height} 8-bit RGB noise`, cls: 'noise', width, height, ffPixFmt: 'rgb24', rawFile, rawBytes: raw.length,
      input: { kind: 'rgb', data: raw, width, height, channels: 3, bitDepth: 8, range: 'full' },
    }
  }
  const code = () => 4 + (next() >>> 22) % 1016
  const y = new Uint16Array(width * height).map(code)
  const cb = new Uint16Array(width * height / 2).map(code)
  const cr = new Uint16Array(width * height / 2).map(code)
  const rawFile = join(dir, `noise-yuv10-${width}.raw`)
  writeFileSync(rawFile, Buffer.concat([y, cb, cr].map(p => new Uint8Array(p.buffer))))
  const v210 = packV210(y, cb, cr, width, height)
  return {
    label: `${width}×${height} 10-bit noise`, cls: 'noise', width, height, ffPixFmt: 'yuv422p10le', rawFile, rawBytes: v210.length,
    input: { kind: 'v210', data: v210, width, height },
  }
}

/**
 * Camera-like grain: smooth gradients with ±4 codes (8-bit) or ±8 codes (10-bit) of noise,
 * the kind of frame a grab from a camera original is. Almost no sample repeats the one above
 * it, but neighbours are close, unlike uniform noise (the worst case above).
 */
function makeGrainCase(width: number, height: number, kind: 'rgb8' | 'yuv10'): Case {
  let s = 777
  const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0)
  const clamp = (v: number, lo: number, hi: number) => (v < lo ? lo : v > hi ? hi : v | 0)
  if (kind === 'rgb8') {
    const raw = new Uint8Array(width * height * 3)
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const n = (next() >>> 24) % 9 - 4
        const o = (y * width + x) * 3
        raw[o] = clamp(x * 200 / width + n, 0, 255)
        raw[o + 1] = clamp(y * 220 / height + n, 0, 255)
        raw[o + 2] = clamp((x + y) * 160 / (width + height) + n, 0, 255)
      }
    }
    const rawFile = join(dir, `grain-rgb-${width}.raw`)
    writeFileSync(rawFile, raw)
    return {
      label: `${width}×${height} 8-bit RGB grain`, cls: 'grain', width, height, ffPixFmt: 'rgb24', rawFile, rawBytes: raw.length,
      input: { kind: 'rgb', data: raw, width, height, channels: 3, bitDepth: 8, range: 'full' },
    }
  }
  const y = new Uint16Array(width * height)
  const cb = new Uint16Array(width * height / 2)
  const cr = new Uint16Array(width * height / 2)
  for (let r = 0; r < height; r++) {
    for (let x = 0; x < width; x++) {
      const n = (next() >>> 24) % 17 - 8
      y[r * width + x] = clamp(64 + x * 800 / width + n, 4, 1019)
      if (!(x & 1)) {
        cb[(r * width + x) >> 1] = clamp(400 + r * 200 / height + n, 4, 1019)
        cr[(r * width + x) >> 1] = clamp(600 - x * 150 / width + n, 4, 1019)
      }
    }
  }
  const rawFile = join(dir, `grain-yuv10-${width}.raw`)
  writeFileSync(rawFile, Buffer.concat([y, cb, cr].map(p => new Uint8Array(p.buffer))))
  const v210 = packV210(y, cb, cr, width, height)
  return {
    label: `${width}×${height} 10-bit grain`, cls: 'grain', width, height, ffPixFmt: 'yuv422p10le', rawFile, rawBytes: v210.length,
    input: { kind: 'v210', data: v210, width, height },
  }
}

function makeCase(width: number, height: number, kind: 'rgb8' | 'yuv10'): Case {
  const source = `testsrc2=s=${width}x${height}`
  if (kind === 'rgb8') {
    const raw = ffmpeg(['-v', 'error', '-f', 'lavfi', '-i', source, '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-']).stdout
    const rawFile = join(dir, `rgb-${width}.raw`)
    writeFileSync(rawFile, raw)
    return {
      label: `${width}×${height} 8-bit RGB`, cls: 'pattern', width, height, ffPixFmt: 'rgb24', rawFile, rawBytes: raw.length,
      input: { kind: 'rgb', data: new Uint8Array(raw.buffer, raw.byteOffset, raw.length), width, height, channels: 3, bitDepth: 8, range: 'full' },
    }
  }
  const planar = ffmpeg(['-v', 'error', '-f', 'lavfi', '-i', source, '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', 'yuv422p10le', '-']).stdout
  const rawFile = join(dir, `yuv10-${width}.raw`)
  writeFileSync(rawFile, planar)
  // The engine reads the same picture as a v210 capture, the form 10-bit frames arrive in.
  const v210 = ffmpeg(['-v', 'error', '-f', 'lavfi', '-i', source, '-frames:v', '1', '-c:v', 'v210', '-f', 'rawvideo', '-']).stdout
  return {
    label: `${width}×${height} 10-bit 4:2:2`, cls: 'pattern', width, height, ffPixFmt: 'yuv422p10le', rawFile, rawBytes: v210.length,
    input: { kind: 'v210', data: new Uint8Array(v210.buffer, v210.byteOffset, v210.length), width, height },
  }
}

/**
 * Real photographs: camera pictures from Debian's mate-backgrounds (GPL-2+, authors in its
 * /usr/share/doc/mate-backgrounds/copyright), cropped to the frame and scaled by libvips,
 * 8-bit or 16-bit (scaled in 16 bits, so the 16-bit frames carry more than 256 codes per
 * channel). The package is installed when missing, as root can on these machines.
 */
const PHOTO_DIR = '/usr/share/backgrounds/mate/nature'
const PHOTOS = ['Storm.jpg', 'Dune.jpg', 'Blinds.jpg']

function ensurePhotos(): void {
  if (PHOTOS.every(f => existsSync(join(PHOTO_DIR, f)))) return
  console.log('installing Debian\'s mate-backgrounds for the photographs…')
  const r = spawnSync('apt-get', ['install', '-y', '--no-install-recommends', 'mate-backgrounds'], { stdio: ['ignore', 'ignore', 'pipe'] })
  if (r.status !== 0 || !PHOTOS.every(f => existsSync(join(PHOTO_DIR, f)))) {
    throw new Error(`the photographs need Debian's mate-backgrounds (apt-get install mate-backgrounds): ${r.error?.message ?? r.stderr?.toString().trim()}`)
  }
}

async function makePhotoCase(file: string, width: number, height: number, depth: 8 | 16): Promise<Case> {
  const name = file.replace(/\.jpg$/, '')
  const img = sharp(join(PHOTO_DIR, file)).resize(width, height, { fit: 'cover' }).removeAlpha()
  const rawFile = join(dir, `photo-${name}-${width}-${depth}.raw`)
  if (depth === 8) {
    const raw = await img.raw().toBuffer()
    writeFileSync(rawFile, raw)
    return {
      label: `${width}×${height} 8-bit ${name}`, cls: 'photo', width, height, ffPixFmt: 'rgb24', rawFile, rawBytes: raw.length,
      input: { kind: 'rgb', data: new Uint8Array(raw.buffer, raw.byteOffset, raw.length), width, height, channels: 3, bitDepth: 8, range: 'full' },
    }
  }
  // As server/lib/decode-file.ts reads 16-bit files: the rgb16 pipeline keeps every code.
  const raw = await img.pipelineColourspace('rgb16').toColourspace('rgb16').raw({ depth: 'ushort' }).toBuffer()
  writeFileSync(rawFile, raw)
  const words = new Uint16Array(raw.buffer, raw.byteOffset, raw.length >> 1)
  return {
    label: `${width}×${height} 16-bit ${name}`, cls: 'photo', width, height, ffPixFmt: 'rgb48le', rawFile, rawBytes: raw.length,
    input: { kind: 'rgb', data: words, width, height, channels: 3, bitDepth: 16, range: 'full' },
  }
}

/**
 * The engine's CPU time for one frame: the least of `runs` runs. On a shared machine every
 * disturbance (the neighbours' cache traffic, page faults, a collection) only adds time, so
 * the least is the best estimate of the work itself; ffmpeg gets the same treatment below.
 */
function timeEngine(input: FrameInput, keepDensities: boolean, runs: number): number {
  const times: number[] = []
  for (let i = 0; i < runs; i++) {
    const t0 = process.cpuUsage()
    analyseFrame(input, { keepDensities })
    const d = process.cpuUsage(t0)
    times.push((d.user + d.system) / 1000)
  }
  return Math.min(...times)
}

function timeFfmpeg(c: Case, frames: number): { perFrame: number, withRead: number, stats: number } {
  const input = ['-stream_loop', String(frames - 1), '-f', 'rawvideo', '-pix_fmt', c.ffPixFmt, '-s', `${c.width}x${c.height}`, '-i', c.rawFile]
  // R'G'B' goes through swscale to Y'CbCr first, as the engine converts it too.
  // 16-bit R'G'B' goes to 12-bit 4:4:4, the deepest form waveform and vectorscope take.
  const head = c.ffPixFmt === 'rgb24' ? '[0:v]format=yuv444p,' : c.ffPixFmt === 'rgb48le' ? '[0:v]format=yuv444p12le,' : '[0:v]'
  const graph = `${head}split=3[a][b][c];[a]signalstats[s];[b]waveform[w];[c]vectorscope[v]`
  const full = ffmpegCpuMs([...input, '-filter_complex', graph, '-map', '[s]', '-f', 'null', '-', '-map', '[w]', '-f', 'null', '-', '-map', '[v]', '-f', 'null', '-'])
  // signalstats alone: what the engine without densities (statistics and verdict) stands beside.
  const stats = ffmpegCpuMs([...input, '-filter_complex', `${head}signalstats[s]`, '-map', '[s]', '-f', 'null', '-'])
  // Reading and looping the raw file alone, to take ffmpeg's I/O out of the comparison.
  const read = ffmpegCpuMs([...input, '-f', 'null', '-'])
  return { perFrame: Math.max(0, full - read) / frames, withRead: full / frames, stats: Math.max(0, stats - read) / frames }
}

/**
 * Both sides measured in turns (engine, ffmpeg, engine, …), each keeping its least time, so
 * a spell of load on the machine falls on both rather than on one.
 */
function measure(c: Case, rounds: number): { full: number, stats: number, ff: number, ffRead: number, ffStats: number } {
  const hd = c.width > 1000
  // Enough runs for the optimising compiler to settle before anything is timed.
  for (let i = 0; i < 8; i++) { analyseFrame(c.input, { keepDensities: true }); analyseFrame(c.input, { keepDensities: false }) }
  let full = Infinity; let stats = Infinity; let ff = Infinity; let ffRead = Infinity; let ffStats = Infinity
  for (let r = 0; r < rounds; r++) {
    full = Math.min(full, timeEngine(c.input, true, hd ? 5 : 10))
    stats = Math.min(stats, timeEngine(c.input, false, hd ? 5 : 10))
    const f = timeFfmpeg(c, hd ? 20 : 40)
    ff = Math.min(ff, f.perFrame)
    ffRead = Math.min(ffRead, f.withRead)
    ffStats = Math.min(ffStats, f.stats)
  }
  return { full, stats, ff, ffRead, ffStats }
}

function typedBytes(a: FrameAnalysis): number {
  let s = 0
  const h = a.histograms
  for (const d of [h.y, h.cb, h.cr, h.r, h.g, h.b, h.levels.luma, h.levels.compMax, h.levels.compMin, h.levels.rgbMax, h.levels.rgbMin]) s += d.byteLength
  if (a.waveform) for (const d of [a.waveform.luma, a.waveform.flat, a.waveform.rgb.r, a.waveform.rgb.g, a.waveform.rgb.b]) s += d.byteLength
  if (a.vectorscope) s += a.vectorscope.data.byteLength
  return s
}

// ArrayBuffer memory is released by a background sweeper after a collection: collect, then
// give it a moment, so the baseline holds no garbage from earlier runs.
async function settle(): Promise<void> {
  for (let i = 0; i < 3; i++) {
    gc()
    await new Promise(r => setTimeout(r, 50))
  }
}

async function allocation(input: FrameInput): Promise<{ retained: number, transient: number, arrays: number }> {
  await settle()
  const m0 = process.memoryUsage()
  const a = analyseFrame(input, { keepDensities: true })
  const m1 = process.memoryUsage()
  await settle()
  const m2 = process.memoryUsage()
  const total = (m: NodeJS.MemoryUsage) => m.heapUsed + m.arrayBuffers
  const res = { transient: total(m1) - total(m0), retained: total(m2) - total(m0), arrays: typedBytes(a) }
  void a.width
  return res
}

const mb = (b: number) => `${(b / 1048576).toFixed(2)} MB`
const pad = (s: string, n: number) => s.padEnd(n)

/** The targets of issue 16: with densities against ffmpeg's three filters, statistics alone against signalstats. */
const FULL_TARGET: Record<CaseClass, number> = { pattern: 1.0, noise: 1.0, grain: 0.5, photo: 0.5 }
const STATS_TARGET = 0.5

function verdict(ratio: number, target: number): string {
  return `${ratio.toFixed(2)} ${ratio <= target ? '≤' : '>'} ${target.toFixed(1)}${ratio <= target ? '' : ' ✗'}`
}

async function main(): Promise<void> {
  const version = ffmpeg(['-version']).stdout.toString().split('\n')[0]
  console.log(`Linewise engine ${ENGINE_VERSION} on Node ${process.version}; ${version}`)
  console.log('CPU ms per frame, the least of several runs taken in turns (engine, ffmpeg, engine, …), so load on this shared')
  console.log('machine falls on both sides: compare the ratios, not the milliseconds. ffmpeg runs one thread, minus its own raw-read time:')
  console.log('"ffmpeg" is signalstats + waveform + vectorscope, "ff stats" signalstats alone. Linewise: analyseFrame with densities')
  console.log('(waveform luma/flat/RGB, vectorscope, range mask) and without (statistics and verdict). ✗ marks a ratio over its target.\n')
  console.log(`${pad('frame', 30)}${pad('Linewise full', 14)}${pad('stats only', 12)}${pad('ffmpeg', 10)}${pad('ff stats', 10)}${pad('ffmpeg+read', 13)}${pad('full / ffmpeg', 16)}stats / ff stats`)
  // BENCH_ONLY=photo (or pattern, grain, noise) measures one class, for quick A/B runs.
  const only = process.env.BENCH_ONLY
  ensurePhotos()
  const hd: Array<() => Case | Promise<Case>> = [
    () => makeCase(720, 486, 'rgb8'), () => makeCase(720, 486, 'yuv10'), () => makeCase(1920, 1080, 'rgb8'), () => makeCase(1920, 1080, 'yuv10'),
    () => makeGrainCase(1920, 1080, 'rgb8'), () => makeGrainCase(1920, 1080, 'yuv10'),
    () => makeNoiseCase(1920, 1080, 'rgb8'), () => makeNoiseCase(1920, 1080, 'yuv10'),
    ...PHOTOS.slice(0, 3).map(f => () => makePhotoCase(f, 1920, 1080, 8)),
    () => makePhotoCase(PHOTOS[0]!, 720, 486, 8), () => makePhotoCase(PHOTOS[1]!, 720, 486, 8),
    () => makePhotoCase(PHOTOS[0]!, 1920, 1080, 16), () => makePhotoCase(PHOTOS[1]!, 720, 486, 16),
  ]
  const cases: Case[] = []
  for (const make of hd) {
    const c = await make()
    if (only && c.cls !== only) continue
    cases.push(c)
    const { full, stats, ff, ffRead, ffStats } = measure(c, 3)
    const rf = full / ff; const rs = stats / ffStats
    const ms = (v: number) => `${v.toFixed(1)} ms`
    console.log(`${pad(c.label, 30)}${pad(ms(full), 14)}${pad(ms(stats), 12)}${pad(ms(ff), 10)}${pad(ms(ffStats), 10)}${pad(ms(ffRead), 13)}${pad(verdict(rf, FULL_TARGET[c.cls]), 16)}${verdict(rs, STATS_TARGET)}`)
  }
  console.log('\nallocation of one analysis (with densities):')
  for (const c of cases.filter(k => k.width > 1000 && k.cls !== 'noise' && !k.label.includes('16-bit')).slice(0, 6)) {
    // The least of three: garbage of earlier calls collected during the measured one can
    // only add to what it seems to allocate, never take away.
    let a = await allocation(c.input)
    for (let i = 0; i < 2; i++) {
      const b = await allocation(c.input)
      if (Math.max(b.transient, b.retained) < Math.max(a.transient, a.retained)) a = b
    }
    const worst = Math.max(a.transient, a.retained, a.arrays)
    console.log(`${pad(c.label, 26)}raw ${mb(c.rawBytes)}; result arrays ${mb(a.arrays)}; heap + array buffers grew ${mb(a.transient)} during the call, ${mb(a.retained)} kept → ${(worst / c.rawBytes).toFixed(2)} × raw${worst <= 3 * c.rawBytes ? '  (target ≤ 3 × met)' : '  (target ≤ 3 × NOT met)'}`)
  }
}

try {
  await main()
}
finally {
  rmSync(dir, { recursive: true, force: true })
}
