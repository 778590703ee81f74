// Command line: measure one frame grab and print a summary or JSON.
// npm run --silent analyse -- FILE [--range full|studio] [--matrix 601|709]
//   [--raw uyvy|v210 --width W --height H] [--spec NAME] [--line N] [--reference FILE] [--json]
import { parseArgs } from 'node:util'
import {
  analyseFrame, barsTolerancesFor, BUILTIN_SPECS, builtinSpec, DEFAULT_SPEC_NAME, EngineInputError, formatShare,
  LEVEL_SCALES, linePlot, MV_CONVENTION, SCALE_SHORT, toScale,
} from '../../shared/engine/index'
import type { FrameAnalysis, LinePlot, MatrixName, SourceRange } from '../../shared/engine/index'
import { analysisJson, lineJson } from '../../shared/utils/report'
import { applyMatch, measureLineup, withLineup } from '../../shared/utils/lineup'
import type { LineupAnalysisJson } from '../../shared/utils/lineup'
import { decodeFile, DecodeFileError } from '../lib/decode-file'
import type { RawKind } from '../lib/decode-file'

class UsageError extends Error {}

const USAGE = `usage: analyse FILE [--range full|studio] [--matrix 601|709] [--raw uyvy|v210 --width W --height H]
               [--spec ${BUILTIN_SPECS.map(s => s.name).join('|')}] [--line N] [--reference FILE] [--json]
  --reference FILE   match this frame's bars against FILE's (read with the same --raw/--width/--height)`

function oneOf<T extends string>(v: string | undefined, allowed: readonly T[], what: string): T | undefined {
  if (v === undefined) return undefined
  if (!(allowed as readonly string[]).includes(v)) throw new UsageError(`${what} must be one of ${allowed.join(', ')} (got "${v}")`)
  return v as T
}

function int(v: string | undefined, what: string): number | undefined {
  if (v === undefined) return undefined
  if (!/^\d+$/.test(v)) throw new UsageError(`${what} must be a whole number (got "${v}")`)
  return Number(v)
}

function toJson(json: LineupAnalysisJson, line?: LinePlot) {
  return { ...json, ...(line ? { line: lineJson(line) } : {}) }
}

function summary(file: string, a: FrameAnalysis, json: LineupAnalysisJson, line?: LinePlot): string {
  const specName = json.spec
  const out: string[] = []
  const f = (v: number, d = 1) => v.toFixed(d).padStart(8)
  out.push(`${file}: ${a.width}×${a.height}, ${a.bitDepth}-bit, ${a.range} range, BT.${a.matrix}`)
  out.push('')
  out.push(`luma            ${['min', 'p1', 'p10', 'p50', 'mean', 'p90', 'p99', 'max'].map(k => k.padStart(8)).join('')}`)
  for (const s of LEVEL_SCALES) {
    const d = s === 'mv' || s === 'mvNtsc' || s === 'code10' ? 0 : s === 'code8' ? 2 : 1
    const vals = (['min', 'p1', 'p10', 'p50', 'mean', 'p90', 'p99', 'max'] as const).map(k => f(toScale(a.luma[k], s), d))
    out.push(`  ${SCALE_SHORT[s].padEnd(14)}${vals.join('')}`)
  }
  out.push(`  (mV ${MV_CONVENTION}; mV NTSC = 140 IRE per volt, white 714 mV)`)
  out.push('')
  out.push(`composite     ${f(a.compositeIre.min)} … ${a.compositeIre.max.toFixed(1)} IRE (7.5 setup)`)
  out.push(`chroma        Cb ${a.chroma.cbMin.toFixed(1)}…${a.chroma.cbMax.toFixed(1)}, Cr ${a.chroma.crMin.toFixed(1)}…${a.chroma.crMax.toFixed(1)}, p-p max ${a.chroma.ppMaxIre.toFixed(1)} IRE`)
  out.push('shares        ' + Object.entries(a.shares).map(([k, v]) => `${k} ${formatShare(v)}`).join(', '))
  out.push('')
  const b = json.bars
  if (b.recognised) {
    out.push(`bars          ${b.label} (confidence ${b.confidence.toFixed(2)}), BT.${b.matrix}, read on ${b.scale === 'ire' ? 'IRE with 7.5 setup' : 'IRE without setup'}`)
    out.push(`  bar        luma IRE (table)     chroma p-p IRE (table)    phase ° (table)`)
    for (const f of b.bars) {
      out.push(`  ${f.name.padEnd(9)}${f.lumaIre.toFixed(1).padStart(7)} (${f.expectedIre.toFixed(1).padStart(5)})${f.chromaPpIre.toFixed(1).padStart(10)} (${f.expectedChromaPpIre.toFixed(1).padStart(5)})${f.phaseDeg === null ? '' : `${f.phaseDeg.toFixed(1).padStart(13)} (${f.expectedPhaseDeg!.toFixed(1)})`}`)
    }
    out.push(`  black ${b.blackIre!.toFixed(2)} IRE (offset ${b.blackOffsetIre!.toFixed(2)}), setup ${b.setup}, luma gain ${b.lumaGainPct!.toFixed(2)} %, chroma gain ${b.chromaGainPct!.toFixed(2)} %, hue ${b.hueErrorDeg!.toFixed(2)}°`)
    if (b.pluge) out.push(`  PLUGE ${b.pluge.map(p => `${p.label} ${p.relativeIre >= 0 ? '+' : ''}${p.relativeIre.toFixed(2)}`).join(', ')} IRE about black`)
    out.push(`  bars check ${b.verdict!.toUpperCase()} (tolerances: ${b.toleranceSource})`)
  }
  else out.push(`bars          not judged as bars: ${b.notes.join('; ')}`)
  const k = json.blanking
  if (k.applicable && k.hBlankingUs !== null) {
    out.push(`blanking      H ${k.hBlankingExact ? '' : 'at most '}${k.hBlankingUs.toFixed(2)} µs (picture ${k.left!.toFixed(2)}…${k.right!.toFixed(2)} samples), V ${k.vBlankingLinesPerField} lines a field (lines ${k.firstActiveLine}…${k.lastActiveLine}): ${k.verdict!.toUpperCase()}`)
    out.push(`  against ${k.source}`)
  }
  if (json.match) out.push(`match         ${json.match.summary} against ${json.match.reference.frameName}: ${json.match.verdict.toUpperCase()}`)
  out.push('')
  out.push(`verdict       ${json.verdict.toUpperCase()} against ${specName}`)
  for (const r of json.reasons) out.push(`  ${r.severity === 'fail' ? 'FAIL' : 'CAUTION'}  ${r.message}`)
  if (line) {
    out.push('')
    out.push(`line ${line.index}: x, µs, luma IRE, composite min/max IRE, chroma p-p IRE, phase°, R' G' B'`)
    const step = Math.max(1, Math.ceil(line.samples.length / 24))
    for (let i = 0; i < line.samples.length; i += step) {
      const s = line.samples[i]!
      out.push(`  ${String(s.x).padStart(5)} ${s.us.toFixed(3).padStart(8)} ${f(s.lumaIre)} ${f(s.compMinIre)} ${f(s.compMaxIre)} ${f(s.chromaPpIre)} ${s.phaseDeg === null ? '       –' : f(s.phaseDeg)}  ${s.r.toFixed(3)} ${s.g.toFixed(3)} ${s.b.toFixed(3)}`)
    }
    if (step > 1) out.push(`  (every ${step}th sample; --json gives all)`)
  }
  return out.join('\n')
}

async function main(argv: string[]): Promise<number> {
  let parsed
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        range: { type: 'string' }, matrix: { type: 'string' }, raw: { type: 'string' },
        width: { type: 'string' }, height: { type: 'string' }, spec: { type: 'string' },
        line: { type: 'string' }, reference: { type: 'string' }, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
      },
    })
  }
  catch (e) {
    throw new UsageError((e as Error).message)
  }
  const { values: v, positionals } = parsed
  if (v.help) {
    process.stdout.write(USAGE + '\n')
    return 0
  }
  if (positionals.length !== 1) throw new UsageError(positionals.length ? 'give exactly one FILE' : 'FILE is missing')
  const file = positionals[0]!
  const range = oneOf<SourceRange>(v.range, ['full', 'studio'], '--range')
  const matrix = oneOf<MatrixName>(v.matrix, ['601', '709'], '--matrix')
  const raw = oneOf<RawKind>(v.raw, ['uyvy', 'v210'], '--raw')
  const width = int(v.width, '--width')
  const height = int(v.height, '--height')
  const lineIndex = int(v.line, '--line')
  if (!raw && (width !== undefined || height !== undefined)) throw new UsageError('--width and --height go with --raw')
  if (raw && range === 'full') throw new UsageError('raw Y\'CbCr is always studio range')
  const specName = v.spec ?? DEFAULT_SPEC_NAME
  const spec = builtinSpec(specName)
  if (!spec) throw new UsageError(`unknown spec "${specName}" (built in: ${BUILTIN_SPECS.map(s => s.name).join(', ')})`)

  const input = await decodeFile(file, { range, raw, width, height })
  const a = analyseFrame(input, { matrix, spec })
  let json = withLineup(analysisJson(a, spec.name), measureLineup(input, { matrix, spec }))
  if (v.reference !== undefined) {
    const refInput = await decodeFile(v.reference, { range, raw, width, height })
    const refBars = measureLineup(refInput, { matrix, spec }).bars
    if (!refBars.recognised) throw new UsageError(`the reference ${v.reference} is not bars: ${refBars.notes.join('; ')}`)
    json = applyMatch(json, { bars: refBars, ref: { frameId: 0, frameName: v.reference, reelId: 0, reelName: 'reference' } }, barsTolerancesFor(spec))
  }
  const line = lineIndex === undefined ? undefined : linePlot(input, lineIndex, { matrix })
  process.stdout.write(v.json ? JSON.stringify(toJson(json, line)) + '\n' : summary(file, a, json, line) + '\n')
  return 0
}

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code },
  (e: unknown) => {
    if (e instanceof UsageError) {
      process.stderr.write(`analyse: ${e.message}\n${USAGE}\n`)
      process.exitCode = 2
    }
    else if (e instanceof DecodeFileError || e instanceof EngineInputError) {
      process.stderr.write(`analyse: ${e.message}\n`)
      process.exitCode = 1
    }
    else {
      process.stderr.write(`analyse: unexpected error: ${(e as Error).stack ?? String(e)}\n`)
      process.exitCode = 70
    }
  },
)
