// Control over the running test stack for fault tests: kill and start workers, stop and
// start Redis or MariaDB. Works only under `npm test` (profile "test").
import { spawn } from 'node:child_process'
import { readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { profile, startMariadb, startRedis, stopService } from '../../docker-local/services.mjs'

export const testProfile = () => profile(process.env.LW_PROFILE ?? 'test')

export function workerPids(): number[] {
  const dir = testProfile().runDir
  return readdirSync(dir).filter((f) => f.startsWith('app-worker-') && f.endsWith('.pid'))
    .map((f) => Number(readFileSync(join(dir, f), 'utf8')))
    .filter((pid) => { try { process.kill(pid, 0); return true } catch { return false } })
}

export function killWorkers(signal: NodeJS.Signals = 'SIGKILL') {
  const dir = testProfile().runDir
  for (const pid of workerPids()) {
    process.kill(pid, signal)
    rmSync(join(dir, `app-worker-${pid}.pid`), { force: true })
  }
}

/** Starts a worker like the test command does; `npm test` stops it at the end. */
export function startWorker(extraEnv: Record<string, string> = {}) {
  const child = spawn(process.execPath, ['--import', 'tsx', join(process.cwd(), 'workers/index.ts')], {
    env: { ...process.env, ...extraEnv }, stdio: 'ignore', detached: true,
  })
  child.unref()
  writeFileSync(join(testProfile().runDir, `app-worker-${child.pid}.pid`), String(child.pid))
  return child.pid!
}

export const stopRedis = () => stopService(testProfile(), 'redis')
export const startRedisAgain = () => startRedis(testProfile())
export const stopMariadb = () => stopService(testProfile(), 'mariadb')
export const startMariadbAgain = () => startMariadb(testProfile())
