#!/usr/bin/env node
// `npm run bench:upload`: the script upload path alone (multipart POST → checks → S3 → queue),
// without a worker, so the figures are the server's and the S3 fake's, not the engine's.
// Uses the `bench` profile's services and the frames `npm run bench:pipeline` keeps under
// .data/bench/frames. Not a test: prints MB/s, frames/s, request time p50/p95, connection
// errors and the CPU time the app server and the S3 fake spent per frame (this machine's
// cores are shared, so CPU per frame compares runs better than wall time does).
//
//   npm run bench:upload [-- OUTPUT_DIR…]
// With several built apps (copies of .output), each is measured in turn against the same
// services and frames, in alternating rounds, so a before/after comparison shares the
// machine's load. LW_BENCH_FRAMES, LW_BENCH_PER_REQUEST, LW_BENCH_PARALLEL, LW_BENCH_ROUNDS
// set the load; LW_BENCH_BUSY=N runs N busy loops meanwhile, standing in for analysis
// workers that take the cores (a server that blocks its event loop shows it then);
// LW_BENCH_NODE_ARGS adds options to the app's node; LW_BENCH_KEEP_SERVICES=1 leaves the services running afterwards.
import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { cpSync, readFileSync, rmSync } from 'node:fs'
import { basename, join, resolve } from 'node:path'
import { profile, resetDatabase, ROOT, serviceEnv, startServices, stopServices } from '../../docker-local/services.mjs'
import { ensureNodeModules, log, migrateAndSeed, signInDemoOwner, waitForHttp } from '../../docker-local/stack.mjs'

const FRAMES = Number(process.env.LW_BENCH_FRAMES ?? 100)
const PER_REQUEST = Number(process.env.LW_BENCH_PER_REQUEST ?? 4)
const PARALLEL = Number(process.env.LW_BENCH_PARALLEL ?? 3)
const ROUNDS = Number(process.env.LW_BENCH_ROUNDS ?? 1)

const p = profile('bench')
const outputs = process.argv.slice(2).length ? process.argv.slice(2).map((d) => resolve(d)) : [join(ROOT, '.output')]
const pct = (sorted, q) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]
/** utime + stime of a process in ms, from /proc (Linux clock ticks are 10 ms). */
const cpuMs = (pid) => {
  const f = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ')
  return (Number(f[11]) + Number(f[12])) * 10
}

async function serve(outputDir, port, env) {
  // A copy, so that a build in this checkout during the run cannot change the app under it.
  const copy = join(p.dataDir, `upload-bench-${port}`)
  rmSync(copy, { recursive: true, force: true })
  cpSync(outputDir, copy, { recursive: true })
  // LW_BENCH_NODE_ARGS, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof", to see where the time goes.
  const nodeArgs = (process.env.LW_BENCH_NODE_ARGS ?? '').split(' ').filter(Boolean)
  const child = spawn(process.execPath, [...nodeArgs, join(copy, 'server/index.mjs')], {
    cwd: ROOT, env: { ...env, NITRO_HOST: '127.0.0.1', NITRO_PORT: String(port) }, stdio: ['ignore', 'ignore', 'inherit'],
  })
  const base = `http://127.0.0.1:${port}`
  await waitForHttp(`${base}/login`)
  return { base, pid: child.pid, stop: () => new Promise((r) => { child.once('exit', r); child.kill('SIGTERM') }), copy }
}

let s3pid = 0
let dbPid = 0

async function uploadAll(base, cookie, productionId, files, serverPid) {
  const r = await fetch(new URL(`/api/productions/${productionId}/reels`, base), {
    method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify({ name: `Upload bench ${Date.now()}` }),
  })
  const reel = await r.json()
  const batches = []
  for (let i = 0; i < files.length; i += PER_REQUEST) batches.push(files.slice(i, i + PER_REQUEST))
  let next = 0
  const times = []
  const errors = []
  let refused = 0
  const cpu0 = { server: cpuMs(serverPid), s3: cpuMs(s3pid), db: cpuMs(dbPid), client: cpuMs(process.pid) }
  const t0 = performance.now()
  await Promise.all(Array.from({ length: PARALLEL }, async () => {
    while (next < batches.length) {
      const batch = batches[next++]
      const form = new FormData()
      for (const f of batch) form.append('file', new Blob([f.bytes], { type: 'image/png' }), f.name)
      for (let attempt = 1; ; attempt++) {
        const t = performance.now()
        try {
          const res = await fetch(new URL(`/api/reels/${reel.id}/frames`, base), { method: 'POST', headers: { cookie }, body: form })
          const body = await res.json().catch(() => null)
          times.push(performance.now() - t)
          if (!body?.files) refused += batch.length
          else refused += body.files.filter((f) => !f.ok).length
          break
        } catch (e) {
          // Counted, then sent again as a script should (a repeat is answered as a duplicate).
          errors.push(e.cause?.code ?? e.cause?.message ?? e.message)
          if (attempt >= 3) throw e
        }
      }
    }
  }))
  const ms = performance.now() - t0
  return {
    ms, times: times.sort((a, b) => a - b), errors, refused,
    serverCpu: cpuMs(serverPid) - cpu0.server, s3Cpu: cpuMs(s3pid) - cpu0.s3, dbCpu: cpuMs(dbPid) - cpu0.db, clientCpu: cpuMs(process.pid) - cpu0.client,
  }
}

let servers = []
let busy = []
try {
  ensureNodeModules()
  await startServices(p)
  resetDatabase(p)
  const env = { ...process.env, ...serviceEnv(p), NUXT_SESSION_PASSWORD: randomBytes(36).toString('base64url') }
  migrateAndSeed(env)
  const { ensureFrames } = await import('./pipeline-frames.mjs')
  const paths = await ensureFrames(join(p.dataDir, 'frames'), FRAMES)
  const files = paths.map((path) => ({ name: basename(path), bytes: readFileSync(path) }))
  const mb = files.reduce((s, f) => s + f.bytes.length, 0) / 2 ** 20
  s3pid = Number(readFileSync(join(p.runDir, 's3.pid'), 'utf8'))
  dbPid = Number(readFileSync(join(p.runDir, 'mariadbd.pid'), 'utf8'))
  servers = await Promise.all(outputs.map((dir, i) => serve(dir, p.ports.app + i, env)))
  const sessions = await Promise.all(servers.map((s) => signInDemoOwner(s.base)))
  log(`${FRAMES} frames (${mb.toFixed(0)} MB), ${PER_REQUEST} per request, ${PARALLEL} requests at a time, ${ROUNDS} round(s) per app`)
  busy = Array.from({ length: Number(process.env.LW_BENCH_BUSY ?? 0) }, () => spawn(process.execPath, ['-e', 'for (;;);'], { stdio: 'ignore' }))
  if (busy.length) log(`${busy.length} busy loop(s) running meanwhile`)
  const results = outputs.map(() => [])
  for (let round = 0; round < ROUNDS; round++) {
    for (const [i, s] of servers.entries()) {
      const r = await uploadAll(s.base, sessions[i].cookie, sessions[i].productionId, files, s.pid)
      results[i].push(r)
      const seconds = r.ms / 1000
      console.log(`  ${outputs[i].replace(ROOT + '/', '').padEnd(32)} round ${round + 1}: ${(mb / seconds).toFixed(1)} MB/s, ${(FRAMES / seconds).toFixed(1)} frames/s, `
        + `request p50 ${(pct(r.times, 0.5) / 1000).toFixed(2)} s p95 ${(pct(r.times, 0.95) / 1000).toFixed(2)} s, `
        + `CPU per frame: server ${(r.serverCpu / FRAMES).toFixed(0)} ms, S3 fake ${(r.s3Cpu / FRAMES).toFixed(0)} ms, `
        + `MariaDB ${(r.dbCpu / FRAMES).toFixed(0)} ms, this client ${(r.clientCpu / FRAMES).toFixed(0)} ms, `
        + `connection errors ${r.errors.length}${r.errors.length ? ` (${[...new Set(r.errors)].join(', ')})` : ''}, refused ${r.refused}`)
    }
  }
  process.exitCode = results.flat().some((r) => r.refused) ? 1 : 0
} catch (e) {
  console.error(`[linewise] ${e.stack ?? e.message}`)
  process.exitCode = 1
} finally {
  for (const b of busy) b.kill('SIGKILL')
  for (const s of servers) {
    await s.stop()
    rmSync(s.copy, { recursive: true, force: true })
  }
  if (process.env.LW_BENCH_KEEP_SERVICES !== '1') await stopServices(p)
}
