#!/usr/bin/env node
// `npm test`: the same stack as `npm start` on its own ports, data folder and database,
// then every test (unit, integration, browser). Exit status is vitest's.
// Extra arguments go to vitest, e.g. `npm test -- tests/integration`.
import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { ensureDebian, profile, resetDatabase, ROOT, serviceEnv, startServices, stopServices } from './services.mjs'
import { ensureBuild, ensureNodeModules, log, migrateAndSeed, startApp, waitForHttp } from './stack.mjs'

const p = profile('test')
let stopApp = async () => {}
let code = 1
const crashes = []

/**
 * One test run at a time per checkout: a second `npm test` waits for the first instead of
 * stopping the services under it. A lock whose process is gone is taken over.
 */
async function takeLock() {
  const file = join(ROOT, '.data', `${p.name}.lock`)
  mkdirSync(join(ROOT, '.data'), { recursive: true })
  for (let said = false; ;) {
    try {
      writeFileSync(file, String(process.pid), { flag: 'wx' })
      process.on('exit', () => { try { if (readFileSync(file, 'utf8') === String(process.pid)) rmSync(file) } catch { /* gone */ } })
      return
    } catch {
      const holder = Number(readFileSync(file, 'utf8'))
      let alive = false
      try { process.kill(holder, 0); alive = true } catch { /* dead */ }
      if (!alive) { rmSync(file, { force: true }); continue }
      if (!said) { log(`waiting for another test run (pid ${holder}) to finish`); said = true }
      await new Promise((r) => setTimeout(r, 2000))
    }
  }
}

try {
  await takeLock()
  ensureNodeModules()
  // ffmpeg is the independent reference implementation in the engine tests; chromium runs the browser tests;
  // pdftoppm (poppler) renders the sheet's PDF pages to images, as a reader would see them.
  ensureDebian({ ffmpeg: 'ffmpeg', chromium: 'chromium', pdftoppm: 'poppler-utils' })
  // A test run starts from nothing: leftovers of an interrupted run are stopped and wiped.
  await stopServices(p)
  for (const d of ['s3', 'mail']) rmSync(join(p.dataDir, d), { recursive: true, force: true })
  await startServices(p)
  resetDatabase(p)
  const env = {
    ...process.env,
    ...serviceEnv(p),
    NUXT_SESSION_PASSWORD: randomBytes(36).toString('base64url'),
    LW_APP_URL: `http://127.0.0.1:${p.ports.app}`,
    LW_PROFILE: p.name,
  }
  migrateAndSeed(env)
  ensureBuild()
  // An exception nobody caught in the app server or the worker fails the run, even when
  // every test passed: the process logged it and went on, and a user would have met it.
  stopApp = startApp(env, {
    port: p.ports.app, runDir: p.runDir, quiet: true,
    onStderr: (name, text) => {
      for (const m of text.matchAll(/\[(uncaughtException|unhandledRejection)\][^\n]*/g)) crashes.push(`${name}: ${m[0]}`)
    },
  })
  await waitForHttp(`${env.LW_APP_URL}/login`)
  log('running tests')
  code = await new Promise((resolve) => {
    const child = spawn(process.execPath, [join(ROOT, 'node_modules/vitest/vitest.mjs'), 'run', ...process.argv.slice(2)], { cwd: ROOT, env, stdio: 'inherit' })
    const forward = (sig) => child.kill(sig)
    process.on('SIGINT', forward)
    process.on('SIGTERM', forward)
    child.on('exit', (c, sig) => resolve(c ?? (sig ? 1 : 0)))
  })
  if (crashes.length) {
    console.error(`[linewise] the app logged ${crashes.length} uncaught error(s) during the tests:\n  ${crashes.join('\n  ')}`)
    code = code || 1
  }
} catch (e) {
  console.error(`[linewise] ${e.stack ?? e.message}`)
  code = 1
} finally {
  await stopApp()
  await stopServices(p)
}
process.exit(code)
