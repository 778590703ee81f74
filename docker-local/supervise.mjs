// Keeps a child process running: when it dies on its own it is started again after a
// pause that doubles with each quick death (1 s, 2 s, 4 s … 30 s) and starts over once a
// run has lasted a minute. Every death is logged with its reason.
import { constants } from 'node:os'

export const BACKOFF = { firstMs: 1000, maxMs: 30_000, healthyAfterMs: 60_000 }

/** Why a process ended, in words: the exit code, or the signal and what usually sends it. */
export function deathReason(code, signal) {
  if (signal === 'SIGKILL') return 'killed by SIGKILL (the kernel\'s out-of-memory killer, or a kill -9)'
  if (signal) return `killed by ${signal}`
  if (code === 134) return 'exit 134 (aborted; V8 ends this way when the heap is exhausted)'
  const byNumber = Object.fromEntries(Object.entries(constants.signals).map(([k, v]) => [v, k]))
  if (code !== null && code > 128 && byNumber[code - 128]) return `exit ${code} (${byNumber[code - 128]})`
  return `exit ${code}`
}

/**
 * start() must return a ChildProcess. Returns { stop, restarts }; stop() ends the current
 * child (SIGTERM, then SIGKILL after `killAfterMs`) and no new one is started.
 */
export function supervise(name, start, { log = console.log, backoff = BACKOFF, killAfterMs = 15_000, onStart } = {}) {
  let child
  let stopped = false
  let delay = backoff.firstMs
  let timer
  const state = { restarts: 0 }
  const launch = () => {
    const startedAt = Date.now()
    child = start()
    onStart?.(child)
    child.once('exit', (code, signal) => {
      child.exited = true
      if (stopped) return
      if (Date.now() - startedAt >= backoff.healthyAfterMs) delay = backoff.firstMs
      log(`${name} died: ${deathReason(code, signal)}; starting it again in ${delay / 1000} s`)
      timer = setTimeout(() => {
        state.restarts++
        launch()
      }, delay)
      delay = Math.min(delay * 2, backoff.maxMs)
    })
  }
  launch()
  return {
    state,
    get child() { return child },
    async stop() {
      stopped = true
      clearTimeout(timer)
      if (!child || child.exited) return
      await new Promise((resolve) => {
        const t = setTimeout(() => child.kill('SIGKILL'), killAfterMs)
        child.once('exit', () => { clearTimeout(t); resolve() })
        child.kill('SIGTERM')
      })
    },
  }
}
