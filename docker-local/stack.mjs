// Shared steps of `npm start` and `npm test`: install what is missing, start the services,
// migrate and seed, build when the sources changed, and run the app server and the worker.
// Plain Node without dependencies: it runs before node_modules exists on a fresh clone.
import { spawn, spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { join, relative } from 'node:path'
import { ROOT } from './services.mjs'
import { supervise } from './supervise.mjs'

export function log(msg) {
  console.log(`[linewise] ${msg}`)
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', cwd: ROOT, ...opts })
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed (exit ${r.status ?? r.signal})`)
}

const sha = (s) => createHash('sha256').update(s).digest('hex')

/** `npm ci` when node_modules is missing or was installed from another lock file. */
export function ensureNodeModules() {
  const lock = join(ROOT, 'package-lock.json')
  const stamp = join(ROOT, 'node_modules', '.linewise-lock')
  const want = sha(readFileSync(lock))
  if (existsSync(stamp) && readFileSync(stamp, 'utf8') === want) return
  log('installing npm packages (npm ci)')
  run('npm', ['ci', '--no-audit', '--no-fund'])
  writeFileSync(stamp, want)
}

/** The session-sealing password: from the environment, else one generated per data folder. */
export function sessionPassword(dataDir) {
  if (process.env.NUXT_SESSION_PASSWORD) return process.env.NUXT_SESSION_PASSWORD
  const file = join(dataDir, 'session-password')
  if (!existsSync(file)) {
    mkdirSync(dataDir, { recursive: true })
    writeFileSync(file, randomBytes(36).toString('base64url'), { mode: 0o600 })
  }
  return readFileSync(file, 'utf8').trim()
}

const BUILD_INPUTS = ['app', 'server', 'shared', 'public', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json']

function fingerprint() {
  const h = createHash('sha256')
  const walk = (p) => {
    const st = statSync(p, { throwIfNoEntry: false })
    if (!st) return
    if (st.isDirectory()) {
      for (const e of readdirSync(p).sort()) walk(join(p, e))
    } else {
      h.update(`${relative(ROOT, p)}:${st.size}:${st.mtimeMs}\n`)
    }
  }
  for (const i of BUILD_INPUTS) walk(join(ROOT, i))
  return h.digest('hex')
}

/** `nuxt build` unless .output was built from exactly these sources. */
export function ensureBuild() {
  const stamp = join(ROOT, '.output', '.linewise-build')
  const want = fingerprint()
  if (existsSync(stamp) && readFileSync(stamp, 'utf8') === want) return
  log('building the app (nuxt build)')
  run(process.execPath, [join(ROOT, 'node_modules/nuxt/bin/nuxt.mjs'), 'build'], { stdio: ['ignore', 'ignore', 'inherit'] })
  writeFileSync(stamp, want)
}

export function migrateAndSeed(env) {
  run(process.execPath, ['--import', 'tsx', 'server/db/migrate.ts'], { env })
  run(process.execPath, ['--import', 'tsx', 'server/seed/seed.ts'], { env })
}

/**
 * Starts the built server and one worker; returns a stop function. PIDs go to
 * `<runDir>/app-*.pid`, so a fault test may kill the worker and start another in its place
 * (tests/support/stack.ts) and stop() still ends whatever is listed there.
 */
export function startApp(env, { port, runDir, quiet = false, onExit, onStderr, outputDir = join(ROOT, '.output'), restart = false } = {}) {
  const children = []
  const supervisors = []
  // onStderr(name, text): each piece of a process's standard error, which is still shown.
  const stdio = [quiet ? 'ignore' : 'inherit', quiet ? 'ignore' : 'inherit', onStderr ? 'pipe' : 'inherit']
  const pidFile = (name, pid) => join(runDir, `app-${name}-${pid}.pid`)
  const spawnOne = (name, args, extraEnv) => {
    const child = spawn(process.execPath, args, { cwd: ROOT, env: { ...env, ...extraEnv }, stdio })
    child.stderr?.on('data', (b) => { process.stderr.write(b); onStderr(name, b.toString()) })
    child.on('exit', (code, signal) => {
      child.exited = true
      if (runDir && restart) rmSync(pidFile(name, child.pid), { force: true })
      onExit?.(name, code, signal)
    })
    children.push(child)
    if (runDir) writeFileSync(pidFile(name, child.pid), String(child.pid))
    return child
  }
  const add = (name, args, extraEnv = {}) => {
    // `npm start` keeps the worker alive: a worker that dies (killed, out of memory on a huge
    // file) is started again with backoff while the app goes on serving; its jobs are retried.
    if (restart && name === 'worker') supervisors.push(supervise(name, () => spawnOne(name, args, extraEnv), { log }))
    else spawnOne(name, args, extraEnv)
  }
  // LW_SERVER_NODE_ARGS / LW_WORKER_NODE_ARGS, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof", to
  // see where a benchmark's time goes (Node refuses --cpu-prof in NODE_OPTIONS).
  const nodeArgs = (name) => (process.env[name] ?? '').split(' ').filter(Boolean)
  add('server', [...nodeArgs('LW_SERVER_NODE_ARGS'), join(outputDir, 'server/index.mjs')], { PORT: String(port), HOST: '127.0.0.1', NITRO_HOST: '127.0.0.1', NITRO_PORT: String(port) })
  add('worker', [...nodeArgs('LW_WORKER_NODE_ARGS'), '--import', 'tsx', join(ROOT, 'workers/index.ts')])
  return async function stop() {
    await Promise.all(supervisors.map((s) => s.stop()))
    if (runDir) {
      for (const f of readdirSync(runDir).filter((f) => f.startsWith('app-') && f.endsWith('.pid'))) {
        const pid = Number(readFileSync(join(runDir, f), 'utf8'))
        if (!children.some((c) => c.pid === pid)) {
          try { process.kill(pid, 'SIGTERM') } catch { /* already gone */ }
        }
        rmSync(join(runDir, f), { force: true })
      }
    }
    for (const c of children) if (!c.exited) c.kill('SIGTERM')
    await Promise.all(children.map((c) => c.exited ? null : new Promise((r) => {
      const t = setTimeout(() => { c.kill('SIGKILL'); r() }, 15000)
      c.once('exit', () => { clearTimeout(t); r() })
    })))
  }
}

export async function waitForHttp(url, ms = 60000) {
  const until = Date.now() + ms
  while (Date.now() < until) {
    try {
      const r = await fetch(url)
      if (r.status < 500) return
    } catch { /* not yet */ }
    await new Promise((r) => setTimeout(r, 200))
  }
  throw new Error(`${url} did not answer within ${ms / 1000} s`)
}

/**
 * Signs in as the seeded demo owner (the benchmarks' user) and finds the demo production:
 * the session cookie and the production's id.
 */
export async function signInDemoOwner(base) {
  const { tsImport } = await import('tsx/esm/api')
  const { DEMO_USERS } = await tsImport('../server/seed/demo.ts', import.meta.url)
  const owner = DEMO_USERS.find((u) => u.role === 'owner')
  const login = await fetch(new URL('/api/auth/login', base), {
    method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: owner.email, password: owner.password }),
  })
  if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`)
  const cookie = login.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
  const get = async (path) => (await fetch(new URL(path, base), { headers: { cookie } })).json()
  const teams = await get('/api/teams')
  const prods = await get(`/api/teams/${(teams.teams ?? teams)[0].id}/productions`)
  return { cookie, productionId: (prods.productions ?? prods)[0].id }
}

