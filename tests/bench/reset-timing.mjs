#!/usr/bin/env node
// Time of POST /api/auth/password-reset/request for an address with an account and one
// without, against a running app (`npm start`, or LW_BENCH_URL). Known and unknown requests
// alternate in one run, so both see the same machine load; prints medians and their ratio.
// Each request comes from its own local address (127.0.0.x) and each address with an
// account is asked at most 3 times, so no answer is a throttled one.
//   node tests/bench/reset-timing.mjs
import { request } from 'node:http'

const base = new URL(process.env.LW_BENCH_URL ?? `http://127.0.0.1:${process.env.LW_APP_PORT ?? 3000}`)
const KNOWN = ['owner@northgate.example', 'editor@northgate.example', 'reviewer@northgate.example', 'producer@northgate.example']

function post(localAddress, email) {
  const body = JSON.stringify({ email })
  return new Promise((resolve, reject) => {
    const t0 = process.hrtime.bigint()
    const req = request({ host: base.hostname, port: base.port, path: '/api/auth/password-reset/request', method: 'POST', localAddress,
      headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body), connection: 'close' } }, (res) => {
      res.resume()
      res.on('end', () => resolve({ status: res.statusCode, ms: Number(process.hrtime.bigint() - t0) / 1e6 }))
    })
    req.on('error', reject)
    req.end(body)
  })
}

const median = (a) => { const s = [...a].sort((x, y) => x - y); return s[Math.floor(s.length / 2)] }
const known = []
const unknown = []
const run = Date.now().toString(36)
for (let i = 0; i < KNOWN.length * 3; i++) {
  const a = await post(`127.0.${10 + Math.floor(i / 10)}.${(i % 10) + 2}`, KNOWN[i % KNOWN.length])
  const b = await post(`127.0.${20 + Math.floor(i / 10)}.${(i % 10) + 2}`, `nobody-${run}-${i}@northgate.example`)
  if (a.status !== 200 || b.status !== 200) throw new Error(`unexpected answers ${a.status} / ${b.status} (already throttled? wait an hour or restart Redis)`)
  known.push(a.ms)
  unknown.push(b.ms)
}
console.log(`password-reset request, ${known.length} each, alternating:`)
console.log(`  known account    median ${median(known).toFixed(2)} ms`)
console.log(`  unknown address  median ${median(unknown).toFixed(2)} ms`)
console.log(`  ratio known/unknown ${(median(known) / median(unknown)).toFixed(2)}`)
