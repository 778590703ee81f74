// `npm start` restarts a worker that dies (docker-local/supervise.mjs), with real child
// processes standing in for the worker. Backoff is shrunk to milliseconds; the test counts
// restarts and reads the log lines, it does not time anything.
import { spawn } from 'node:child_process'
import { describe, expect, it } from 'vitest'
import { deathReason, supervise } from '../../../docker-local/supervise.mjs'

const FAST = { firstMs: 5, maxMs: 40, healthyAfterMs: 60_000 }
const node = (code: string) => () => spawn(process.execPath, ['-e', code], { stdio: 'ignore' })

describe('supervise', () => {
  it('starts a child that keeps dying again and again, with the reason in each log line, until stopped', async () => {
    const lines: string[] = []
    const s = supervise('worker', node('process.exit(3)'), { log: (l: string) => lines.push(l), backoff: FAST })
    while (s.state.restarts < 4) await new Promise((r) => setTimeout(r, 10))
    await s.stop()
    const after = s.state.restarts
    await new Promise((r) => setTimeout(r, 100))
    expect(s.state.restarts).toBe(after)
    expect(lines[0]).toBe('worker died: exit 3; starting it again in 0.005 s')
    // The pause doubles with each quick death, up to its cap: 5, 10, 20, 40, 40 ms.
    expect(lines.slice(0, 5).map((l) => l.match(/in ([\d.]+) s/)![1])).toEqual(['0.005', '0.01', '0.02', '0.04', '0.04'].slice(0, Math.min(5, lines.length)))
  })

  it('names a SIGKILL (the out-of-memory killer\'s signal) and stops a running child on stop()', async () => {
    const lines: string[] = []
    const s = supervise('worker', node('setInterval(() => {}, 1000)'), { log: (l: string) => lines.push(l), backoff: FAST })
    const first = s.child
    await new Promise((r) => first.once('spawn', r))
    first.kill('SIGKILL')
    while (s.state.restarts < 1) await new Promise((r) => setTimeout(r, 10))
    expect(lines[0]).toMatch(/^worker died: killed by SIGKILL \(the kernel's out-of-memory killer, or a kill -9\)/)
    const second = s.child
    expect(second.pid).not.toBe(first.pid)
    await s.stop()
    expect(second.exitCode !== null || second.signalCode !== null).toBe(true)
  })

  it('words exit codes: heap exhaustion and signals by number', () => {
    expect(deathReason(134, null)).toMatch(/heap is exhausted/)
    expect(deathReason(137, null)).toBe('exit 137 (SIGKILL)')
    expect(deathReason(1, null)).toBe('exit 1')
  })
})
