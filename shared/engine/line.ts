import { EngineInputError, makeRowBuffers, makeRowSource } from './decode'
import { MATRICES, resolveMatrix, U_WEIGHT, V_WEIGHT } from './matrix'
import { code8ToIre } from './scales'
import type { FrameInput, LinePlot, LineSample, MatrixName } from './types'

/** ITU-R BT.601 luma sampling rate; 720 samples span 53.333 µs (computed: 720 / 13.5 MHz). */
export const SAMPLE_RATE_MHZ = 13.5
export const SD_ACTIVE_SAMPLES = 720

/** Microseconds from the start of the active line; other widths are scaled to 720 samples. */
export function sampleToMicroseconds(x: number, width: number): number {
  return x * (SD_ACTIVE_SAMPLES / width) / SAMPLE_RATE_MHZ
}

// Below this amplitude (in Y' units, ≈ 0.002 IRE p-p) the phase is noise, not a hue.
const PHASE_FLOOR = 1e-5

export function linePlot(input: FrameInput, lineIndex: number, opts: { matrix?: MatrixName } = {}): LinePlot {
  const matrix = resolveMatrix(opts.matrix)
  const src = makeRowSource(input, matrix)
  if (!Number.isInteger(lineIndex) || lineIndex < 0 || lineIndex >= src.height) {
    throw new EngineInputError(`line ${lineIndex} is outside the picture (0…${src.height - 1})`)
  }
  const buf = makeRowBuffers(src.width)
  src.readRow(lineIndex, buf)
  const m = MATRICES[matrix]
  const uK = U_WEIGHT * m.cbDiv
  const vK = V_WEIGHT * m.crDiv
  const samples: LineSample[] = new Array(src.width)
  for (let x = 0; x < src.width; x++) {
    const y = buf.y[x]!
    const u = uK * buf.pb[x]!
    const v = vK * buf.pr[x]!
    const c = Math.sqrt(u * u + v * v)
    let phase: number | null = null
    if (c > PHASE_FLOOR) {
      phase = Math.atan2(v, u) * 180 / Math.PI
      if (phase < 0) phase += 360
    }
    samples[x] = {
      x,
      us: sampleToMicroseconds(x, src.width),
      lumaIre: code8ToIre(y),
      compMinIre: code8ToIre(y - 219 * c),
      compMaxIre: code8ToIre(y + 219 * c),
      chromaPpIre: 2 * 92.5 * c,
      phaseDeg: phase,
      r: buf.r[x]!,
      g: buf.g[x]!,
      b: buf.b[x]!,
    }
  }
  return { index: lineIndex, samples }
}
