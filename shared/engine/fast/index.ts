// Fast kernels for the common inputs (8-bit R'G'B', UYVY, v210, planar 4:2:2): the same arithmetic as the
// reference pass in analyse.ts, read straight from the source bytes, with vertical runs folded.
//
// Why runs: pictures brought to a level check (bars, slates, graphics, letterbox, animation)
// repeat a sample straight down the frame far more often than not, and every accumulator of
// the analysis is a function of the source codes alone. So each column of a stripe keeps the
// bins of its last source unit and a count of how many rows in a row repeated it; the
// increments are made once per run. A unit is one pixel of R'G'B', one UYVY pair (one 32-bit
// word) or one v210 group of six pixels (four words), so a repeat costs one compare per unit.
// Where nothing repeats (grain, noise) each unit is flushed with a count of one.
//
// Every bin and extreme is computed by the reference's own expressions in the same order,
// or by a route proven to land on the same value (per-code tables and counts, integer level
// bins away from bin edges, branch-free max/min of bins), so the results are bit for bit
// those of the reference pass, except the luma sum of 8-bit R'G'B', which is added as
// y·count per run and may differ from the reference's pixel-by-pixel sum in the last bits
// (Y'CbCr luma is a multiple of 1/4, so its sums are exact either way).
//
// Why the care over branches: on grain every out-of-range test and max/min would be a coin
// toss for the branch predictor, which costs more than the arithmetic they guard.
import type { Accumulators } from '../accumulate'
import type { FrameInput, MatrixName } from '../types'
import { Kernel } from './kernel'
import { rgb8 } from './rgb8'
import { uyvy } from './uyvy'
import { v210 } from './v210'
import { planar422 } from './planar'

export { fastMode } from './rgb8'
export { fastTuning } from './pairs'

/**
 * Runs the fast kernel for `input` when there is one; false leaves the work to the reference
 * pass. `stripe` is the stripe width in pixels (a multiple of 48, whole v210 groups).
 */
export function fastPass(input: FrameInput, matrix: MatrixName, acc: Accumulators, stripe: number): boolean {
  const k = new Kernel(acc)
  if (input.kind === 'rgb' && input.bitDepth === 8) {
    const { tb, ch } = rgb8(input.data as Uint8Array, input.width, input.height, input.channels, input.range === 'full', matrix, k, stripe)
    tb.finish(k)
    ch.fold(k)
  }
  // The per-code tables are folded here rather than at the end of the kernels: V8 compiles
  // a kernel while its loop runs (on-stack replacement), before the code after the loop has
  // ever run, and a call there with no type feedback deoptimised the kernel on every frame.
  else if (input.kind === 'uyvy') uyvy(input.data, input.width, input.height, k, stripe).finish(k)
  else if (input.kind === 'v210') v210(input.data, input.width, input.height, k, stripe).finish(k)
  // Planar 4:2:2 of even width (a clip's frames as ffmpeg pipes them); odd widths and 4:4:4
  // take the reference pass.
  else if (input.kind === 'planar' && input.subsampling === '422' && input.width % 2 === 0) {
    // Without densities nothing needs stripes for cache: whole rows read the planes in order.
    planar422(input.y, input.cb, input.cr, input.width, input.height, input.bitDepth, k, k.wave ? stripe : input.width).finish(k)
  }
  else return false
  k.finish(acc)
  return true
}
