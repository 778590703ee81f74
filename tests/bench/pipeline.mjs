#!/usr/bin/env node
// `npm run bench:pipeline`: the whole pipeline under load. Brings up the stack as `npm test`
// does, on the `bench` profile (own ports, data folder and database), uploads synthetic
// 1080p PNG frames through the multipart API, waits until every one is analysed, prints
// frames per second and the time from upload to result, then stops what it started.
// Not a test: the figures depend on the machine and on whatever else runs on it.
//
//   LW_BENCH_FRAMES=200 LW_BENCH_PER_REQUEST=4 LW_BENCH_PARALLEL=3 npm run bench:pipeline
// The frames are 1080p stills cut from real photographs (Debian's mate-backgrounds, installed
// when missing); LW_BENCH_SOURCE=synthetic uploads the invented noisy frames instead. Beside
// the worker's CPU per frame it prints the CPU of one ffmpeg command per frame doing what a
// script around ffmpeg would (decode the PNG, signalstats, waveform PNG, vectorscope PNG,
// thumbnail), measured on a sample of the same files before and after the run.
// The app is served from a copy of .output, so that a build by `npm test` during the run
// cannot pull files from under it. LW_BENCH_SKIP_BUILD=1 copies the .output already there
// (a build of our own would race theirs on .output and .nuxt).
import { spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { availableParallelism, loadavg, tmpdir } from 'node:os'
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { basename, join } from 'node:path'
import { profile, resetDatabase, ROOT, serviceEnv, startServices, stopServices } from '../../docker-local/services.mjs'
import { ensureBuild, ensureNodeModules, log, migrateAndSeed, signInDemoOwner, startApp, waitForHttp } from '../../docker-local/stack.mjs'

const FRAMES = Number(process.env.LW_BENCH_FRAMES ?? 200)
const PER_REQUEST = Number(process.env.LW_BENCH_PER_REQUEST ?? 4)
const PARALLEL = Number(process.env.LW_BENCH_PARALLEL ?? 3)
const TIMEOUT_MS = Number(process.env.LW_BENCH_TIMEOUT_MS ?? 30 * 60_000)
const SOURCE = process.env.LW_BENCH_SOURCE ?? 'photos'
/** Frames the ffmpeg command is run on, before the upload and again after the analyses. */
const FFMPEG_SAMPLE = 12

const p = profile('bench')
let stopApp = async () => {}
let code = 1
let stopping = false
const onSignal = () => { if (!stopping) { stopping = true; log('interrupted; stopping'); cleanUp().then(() => process.exit(130)) } }
process.on('SIGINT', onSignal)
process.on('SIGTERM', onSignal)

async function cleanUp() {
  await stopApp()
  await stopServices(p)
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms))
/** utime + stime of a process and all its threads, in ms (Linux clock ticks are 10 ms); 0 once it is gone. */
const cpuMs = (pid) => {
  try {
    const f = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ')
    return (Number(f[11]) + Number(f[12])) * 10
  } catch { return 0 }
}

/** The processes whose CPU the run is charged with, by the PID files the stack writes. */
function benchPids() {
  const pid = (file) => (existsSync(join(p.runDir, file)) ? Number(readFileSync(join(p.runDir, file), 'utf8').trim()) : 0)
  const apps = Object.fromEntries(readdirSync(p.runDir).filter((f) => /^app-.*\.pid$/.test(f)).map((f) => [f.split('-')[1], pid(f)]))
  return { 'app server': apps.server ?? 0, worker: apps.worker ?? 0, 'S3 fake': pid('s3.pid'), MariaDB: pid('mariadb.pid'), Redis: pid('redis.pid'), 'bench client': process.pid }
}

/**
 * CPU ms per frame (utime + stime from -benchmark, the whole process) of the one ffmpeg
 * command a script would run per still: decode the PNG, signalstats to a file, a waveform
 * PNG, a vectorscope PNG and a 320-wide JPEG thumbnail, one thread as the worker's jobs are.
 */
function ffmpegCommandMs(paths) {
  const out = mkdtempSync(join(tmpdir(), 'linewise-ffjob-'))
  try {
    let total = 0
    for (const path of paths) {
      const graph = `[0:v]split=2[p][q];[p]format=yuv444p,split=3[a][b][c];[a]signalstats,metadata=mode=print:file=${join(out, 'stats.txt')}[s];`
        + '[b]waveform[w];[c]vectorscope[v];[q]scale=320:-2[t]'
      const r = spawnSync('ffmpeg', ['-hide_banner', '-nostdin', '-y', '-threads', '1', '-filter_threads', '1', '-filter_complex_threads', '1',
        '-benchmark', '-nostats', '-v', 'info', '-i', path, '-filter_complex', graph,
        '-map', '[s]', '-f', 'null', '-', '-map', '[w]', '-update', '1', join(out, 'waveform.png'),
        '-map', '[v]', '-update', '1', join(out, 'vectorscope.png'), '-map', '[t]', '-update', '1', '-q:v', '4', join(out, 'thumb.jpg')])
      const m = /utime=([\d.]+)s stime=([\d.]+)s/.exec(r.stderr?.toString() ?? '')
      if (r.status !== 0 || !m) throw new Error(`ffmpeg command failed: ${r.error?.message ?? r.stderr?.toString().slice(-400)}`)
      total += (Number(m[1]) + Number(m[2])) * 1000
    }
    return total / paths.length
  } finally {
    rmSync(out, { recursive: true, force: true })
  }
}

const pct = (sorted, q) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]

async function api(base, cookie, method, path, body) {
  const res = await fetch(new URL(path, base), {
    method, headers: { cookie, ...(body ? { 'content-type': 'application/json' } : {}) }, body: body ? JSON.stringify(body) : undefined,
  })
  const json = await res.json().catch(() => null)
  if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${JSON.stringify(json)}`)
  return { json, res }
}

try {
  ensureNodeModules()
  await stopServices(p)
  rmSync(join(p.dataDir, 's3'), { recursive: true, force: true })
  await startServices(p)
  resetDatabase(p)
  const env = { ...process.env, ...serviceEnv(p), NUXT_SESSION_PASSWORD: randomBytes(36).toString('base64url') }
  migrateAndSeed(env)
  if (process.env.LW_BENCH_SKIP_BUILD !== '1') ensureBuild()

  // Made once and kept under .data/bench/frames: generating 200 PNGs takes about a minute.
  const { ensureFrames, ensurePhotoFrames } = await import('./pipeline-frames.mjs')
  log(`preparing ${FRAMES} 1080p PNG frames (${SOURCE})`)
  const paths = SOURCE === 'synthetic' ? await ensureFrames(join(p.dataDir, 'frames'), FRAMES) : await ensurePhotoFrames(join(p.dataDir, 'frames-photos'), FRAMES)
  const sample = paths.slice(0, Math.min(FFMPEG_SAMPLE, paths.length))
  log(`ffmpeg command on ${sample.length} of the frames`)
  const ffBefore = ffmpegCommandMs(sample)
  const files = paths.map((path) => ({ name: basename(path), bytes: readFileSync(path) }))
  const totalMb = files.reduce((s, f) => s + f.bytes.length, 0) / 2 ** 20

  const outputDir = join(p.dataDir, 'output')
  rmSync(outputDir, { recursive: true, force: true })
  cpSync(join(ROOT, '.output'), outputDir, { recursive: true })
  stopApp = startApp(env, { port: p.ports.app, runDir: p.runDir, quiet: !process.env.LW_BENCH_VERBOSE, outputDir })
  const base = env.NUXT_PUBLIC_APP_URL
  await waitForHttp(`${base}/login`)

  const { cookie, productionId } = await signInDemoOwner(base)
  const { json: reel } = await api(base, cookie, 'POST', `/api/productions/${productionId}/reels`, { name: `Bench ${new Date().toISOString()}` })

  log(`uploading ${FRAMES} frames (${totalMb.toFixed(0)} MB), ${PER_REQUEST} per request, ${PARALLEL} requests at a time`)
  const pids = benchPids()
  const cpu0 = Object.fromEntries(Object.entries(pids).map(([k, pid]) => [k, cpuMs(pid)]))
  const t0 = Date.now()
  const batches = []
  for (let i = 0; i < files.length; i += PER_REQUEST) batches.push(files.slice(i, i + PER_REQUEST))
  let next = 0
  let refused = 0
  async function uploader() {
    while (next < batches.length) {
      const batch = batches[next++]
      const form = new FormData()
      for (const f of batch) form.append('file', new Blob([f.bytes], { type: 'image/png' }), f.name)
      // A kept-alive socket the server closes just as a request goes out resets; sending the
      // same files again is safe (the server answers a repeat as a duplicate of the stored frame).
      let res
      for (let attempt = 1; ; attempt++) {
        try {
          res = await fetch(new URL(`/api/reels/${reel.id}/frames`, base), { method: 'POST', headers: { cookie }, body: form })
          break
        } catch (e) {
          if (attempt >= 3) throw e
          console.error(`upload retried: ${e.cause?.message ?? e.message}`)
        }
      }
      const body = await res.json().catch(() => null)
      for (const f of body?.files ?? []) if (!f.ok) { refused++; console.error(`refused ${f.name}: ${f.reason}`) }
      if (!body?.files) { refused += batch.length; console.error(`upload failed: ${res.status}`) }
    }
  }
  await Promise.all(Array.from({ length: PARALLEL }, uploader))
  const uploadedMs = Date.now() - t0
  if (refused) throw new Error(`${refused} frame(s) refused`)

  // Timings come from the database: frames.created_at (stored) and analyses.created_at (result).
  const mysql = (await import('mysql2/promise')).default
  const conn = await mysql.createConnection({ uri: env.NUXT_DATABASE_URL, timezone: 'Z' })
  const until = Date.now() + TIMEOUT_MS
  let last = ''
  for (;;) {
    const [[c]] = await conn.query(`SELECT SUM(status = 'done') AS done, SUM(status = 'failed') AS failed, COUNT(*) AS total FROM frames WHERE reel_id = ?`, [reel.id])
    const line = `${Number(c.done)}/${FRAMES} done, ${Number(c.failed)} failed`
    if (line !== last) { process.stdout.write(`\r[linewise] ${line}   `); last = line }
    if (Number(c.done) + Number(c.failed) >= FRAMES) break
    if (Date.now() > until) throw new Error(`not finished within ${TIMEOUT_MS / 1000} s`)
    await sleep(200)
  }
  const wallMs = Date.now() - t0
  const cpu = Object.entries(pids).map(([k, pid]) => [k, (cpuMs(pid) - cpu0[k]) / FRAMES])
  log(`ffmpeg command on ${sample.length} of the frames again`)
  const ffMs = Math.min(ffBefore, ffmpegCommandMs(sample))
  const workerMs = cpu.find(([k]) => k === 'worker')[1]
  process.stdout.write('\n')
  const [rows] = await conn.query(`SELECT f.created_at AS stored, a.created_at AS analysed, a.duration_ms AS job
    FROM frames f JOIN analyses a ON a.frame_id = f.id WHERE f.reel_id = ?`, [reel.id])
  await conn.end()
  const lat = rows.map((r) => r.analysed - r.stored).sort((a, b) => a - b)
  const jobs = rows.map((r) => r.job).sort((a, b) => a - b)
  const firstStored = Math.min(...rows.map((r) => +r.stored))
  const lastDone = Math.max(...rows.map((r) => +r.analysed))
  const fps = rows.length / ((lastDone - firstStored) / 1000)
  console.log(`
  Pipeline benchmark: ${rows.length} × 1920×1080 PNG ${SOURCE === 'synthetic' ? 'invented noisy frames' : 'stills cut from photographs'} (${(totalMb / FRAMES).toFixed(1)} MB each), ${availableParallelism()} cores, load before ${loadavg()[0].toFixed(1)}
  worker concurrency         ${process.env.LW_WORKER_CONCURRENCY ?? `${availableParallelism()} (cores)`}
  uploads finished after     ${(uploadedMs / 1000).toFixed(1)} s (${(FRAMES / (uploadedMs / 1000)).toFixed(1)} frames/s accepted)
  all analysed after         ${(wallMs / 1000).toFixed(1)} s
  throughput                 ${fps.toFixed(2)} frames/s (first stored → last result)
  upload → result            p50 ${(pct(lat, 0.5) / 1000).toFixed(1)} s, p95 ${(pct(lat, 0.95) / 1000).toFixed(1)} s
  one job in the worker      p50 ${pct(jobs, 0.5)} ms, p95 ${pct(jobs, 0.95)} ms (fetch, decode, engine, images, puts)
  CPU per frame              ${cpu.map(([k, ms]) => `${k} ${ms.toFixed(0)} ms`).join(', ')}
                             total ${cpu.reduce((t, [, ms]) => t + ms, 0).toFixed(0)} ms; ${availableParallelism()} cores give ${(availableParallelism() * 1000 / cpu.reduce((t, [, ms]) => t + ms, 0)).toFixed(1)} frames/s at most
  worker vs one ffmpeg command worker ${workerMs.toFixed(0)} ms CPU per frame (fetch, decode, measure, six images, puts, row)
                             ffmpeg ${ffMs.toFixed(0)} ms CPU per frame (decode, signalstats, waveform PNG, vectorscope PNG, thumbnail; ${sample.length} frames, the lesser of before and after)
                             ratio ${(workerMs / ffMs).toFixed(2)} (target ≤ 1.0${workerMs <= ffMs ? ', met' : ', NOT met'})
`)
  code = rows.length === FRAMES ? 0 : 1
} catch (e) {
  console.error(`[linewise] ${e.stack ?? e.message}${e.cause ? `\n  cause: ${e.cause.stack ?? e.cause}` : ""}`)
  code = 1
} finally {
  if (!stopping) await cleanUp()
}
process.exit(code)
