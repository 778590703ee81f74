// npm run bench:rejudge — judging 10 000 stored frames again against a changed spec, from their
// packed level distributions (what the spec routes do, without the database), beside measuring
// the same frames afresh, in one run. Prints the total time for 10 000 frames, the time per
// frame of each way, their ratio, and the stored size of the levels. Not a test: numbers vary
// with the machine and its load.
import { analyseFrame, builtinSpec, ENGINE_VERSION, packLevels } from '../../shared/engine/index'
import type { DeliverySpec, FrameInput } from '../../shared/engine/index'
import { analysisJson } from '../../shared/utils/report'
import { judgeStored, type StoredMeasurement } from '../../shared/utils/specs'

const FRAMES = 10_000
const DISTINCT = 12
const W = 1920
const H = 1080

/** Camera-like 1080p frames: gradients with grain, each its own brightness, a few with hot highlights. */
function grainFrame(seed: number): FrameInput {
  let s = seed * 2654435761 >>> 0
  const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0)
  const clamp = (v: number) => (v < 0 ? 0 : v > 255 ? 255 : v | 0)
  const lift = (seed % 6) * 10
  const raw = new Uint8Array(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const n = (next() >>> 24) % 9 - 4
      const o = (y * W + x) * 3
      raw[o] = clamp(x * 200 / W + n + lift)
      raw[o + 1] = clamp(y * 220 / H + n + lift)
      raw[o + 2] = clamp((x + y) * 160 / (W + H) + n + lift)
    }
  }
  return { kind: 'rgb', data: raw, width: W, height: H, channels: 3, bitDepth: 8, range: 'full' }
}

/** As the database hands a row to the route: result and levels parsed, Cb/Cr histograms as JSON text. */
interface StoredRow { result: unknown, levels: unknown, bins: string, cb: string, cr: string }

function judgeRow(row: StoredRow, spec: DeliverySpec) {
  const s: StoredMeasurement = {
    result: row.result as StoredMeasurement['result'],
    histograms: { bins: Number(row.bins), get cb() { return JSON.parse(row.cb) as number[] }, get cr() { return JSON.parse(row.cr) as number[] } },
    levels: row.levels as StoredMeasurement['levels'],
  }
  return judgeStored(s, spec).verdict
}

function main() {
  console.log(`Linewise engine ${ENGINE_VERSION} on Node ${process.version}: re-judging ${FRAMES} stored 1080p frames (${DISTINCT} distinct, repeated)`)
  const inputs: FrameInput[] = []
  const rows: StoredRow[] = []
  let levelBytes = 0
  for (let i = 0; i < DISTINCT; i++) {
    const input = grainFrame(i + 1)
    const a = analyseFrame(input)
    const packed = JSON.stringify(packLevels(a.histograms.levels))
    levelBytes += packed.length
    inputs.push(input)
    rows.push({
      result: JSON.parse(JSON.stringify(analysisJson(a, 'ntsc-setup'))), levels: JSON.parse(packed),
      bins: String(a.histograms.bins), cb: JSON.stringify([...a.histograms.cb]), cr: JSON.stringify([...a.histograms.cr]),
    })
  }
  const studio = builtinSpec('digital-studio')!
  const tightened: DeliverySpec = { ...studio, limits: studio.limits.map(l => (l.id === 'luma-max' ? { ...l, value: 200 } : l)) }

  // Taken in turns, least of three: re-judging all 10 000, and measuring a few frames afresh.
  let rejudgeMs = Infinity
  let freshMs = Infinity
  const counts = { pass: 0, caution: 0, fail: 0 }
  for (let round = 0; round < 3; round++) {
    const t0 = performance.now()
    const c = { pass: 0, caution: 0, fail: 0 }
    for (let i = 0; i < FRAMES; i++) c[judgeRow(rows[i % DISTINCT]!, tightened)]++
    rejudgeMs = Math.min(rejudgeMs, performance.now() - t0)
    Object.assign(counts, c)
    const t1 = performance.now()
    for (let i = 0; i < DISTINCT; i++) analyseFrame(inputs[i]!, { spec: tightened })
    freshMs = Math.min(freshMs, (performance.now() - t1) / DISTINCT)
  }
  const perFrame = rejudgeMs / FRAMES
  console.log(`re-judge ${FRAMES} frames: ${(rejudgeMs / 1000).toFixed(2)} s (${perFrame.toFixed(3)} ms a frame; verdicts ${counts.pass} pass, ${counts.caution} caution, ${counts.fail} fail)`)
  console.log(`measure afresh (decoded pixels already in memory): ${freshMs.toFixed(1)} ms a frame → ${(freshMs * FRAMES / 1000).toFixed(0)} s for ${FRAMES}`)
  console.log(`ratio re-judge / measure: ${(perFrame / freshMs).toFixed(4)} (${(freshMs / perFrame).toFixed(0)}× faster)`)
  console.log(`packed levels: ${(levelBytes / DISTINCT / 1024).toFixed(1)} kB a frame as JSON`)
  console.log('Not included: reading the rows from MariaDB and writing the changed ones (one UPDATE per 2000 frames).')
}

main()
