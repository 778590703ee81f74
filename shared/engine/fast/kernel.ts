// What every fast kernel shares: the accumulators copied to fields (Kernel), the queue of
// ended runs, branch-free max/min and the range mask's run marking.
import type { Accumulators } from '../accumulate'
import type { MaskLimits } from '../mask'

export const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1

export class Kernel {
  readonly wave: boolean
  readonly dl: Uint32Array; readonly dhi: Uint32Array; readonly dlo: Uint32Array; readonly dmx: Uint32Array; readonly dmn: Uint32Array
  readonly dr: Uint32Array; readonly dg: Uint32Array; readonly db: Uint32Array
  readonly cbH: Uint32Array; readonly crH: Uint32Array
  readonly wl: Uint32Array; readonly wf: Uint32Array; readonly wr: Uint32Array; readonly wg: Uint32Array; readonly wb: Uint32Array
  readonly vec: Uint32Array; readonly rowOff: Int32Array; readonly colOf: Int32Array
  readonly mask: Uint8Array; readonly maskCol: Int32Array; readonly maskRow: Int32Array; readonly lim: MaskLimits
  readonly uK: number; readonly vK: number; readonly rK: number; readonly bK: number; readonly gR: number; readonly gB: number
  readonly cbOff: number; readonly hs: number; readonly gamHi: number; readonly gamLo: number
  sumY = 0; yMin: number; yMax: number; cbMin: number; cbMax: number; crMin: number; crMax: number
  compMin: number; compMax: number; cMax: number
  compOut = 0; gamOut = 0; studOut = 0

  constructor(acc: Accumulators) {
    const { levels: lv, dens, coef: k, t } = acc
    this.dl = lv.luma; this.dhi = lv.compMax; this.dlo = lv.compMin; this.dmx = lv.rgbMax; this.dmn = lv.rgbMin
    this.dr = lv.r; this.dg = lv.g; this.db = lv.b
    this.cbH = acc.cbHist; this.crH = acc.crHist
    this.wave = dens !== undefined
    const none = new Uint32Array(0)
    this.wl = dens?.luma ?? none; this.wf = dens?.flat ?? none
    this.wr = dens?.r ?? none; this.wg = dens?.g ?? none; this.wb = dens?.b ?? none
    this.vec = dens?.vector ?? none
    this.rowOff = dens?.rowOff ?? new Int32Array(0); this.colOf = dens?.colOf ?? new Int32Array(0)
    this.mask = dens?.mask ?? new Uint8Array(0); this.maskCol = dens?.maskCol ?? new Int32Array(0); this.maskRow = dens?.maskRow ?? new Int32Array(0)
    this.lim = dens?.lim ?? { yHi: 0, yLo: 0, cHi: 0, cLo: 0, rgbHi: 0, rgbLo: 0, cbHi: 0, cbLo: 0, crHi: 0, crLo: 0 }
    this.uK = k.uK; this.vK = k.vK; this.rK = k.rK; this.bK = k.bK; this.gR = k.gR; this.gB = k.gB
    this.cbOff = k.cbOff; this.hs = k.hs; this.gamHi = k.gamHi; this.gamLo = k.gamLo
    this.yMin = t.yMin; this.yMax = t.yMax; this.cbMin = t.cbMin; this.cbMax = t.cbMax; this.crMin = t.crMin; this.crMax = t.crMax
    this.compMin = t.compMin; this.compMax = t.compMax; this.cMax = t.cMax
  }

  finish(acc: Accumulators): void {
    const t = acc.t
    t.sumY += this.sumY; t.yMin = this.yMin; t.yMax = this.yMax; t.compMin = this.compMin; t.compMax = this.compMax
    t.cbMin = this.cbMin; t.cbMax = this.cbMax; t.crMin = this.crMin; t.crMax = this.crMax; t.cMax = this.cMax
    t.compositeOut += this.compOut; t.gamutOut += this.gamOut; t.studioOut += this.studOut
  }
}

// Each kernel holds, per unit of the current stripe, the unit's source key and how many rows
// in a row carried it. Units whose run has ended are queued (column, codes, count) and
// measured a row's worth at a time by one of the two batch functions below, which keep every
// constant and running total in locals: with no repeats at all (noise, grain) that is one
// queue entry per unit, and the batch loop is as tight as a plain per-pixel pass.

// Branch-free integer max/min of three level bins. On noise, data-dependent branches are
// mispredicted about half the time and cost more than all the arithmetic; the bin of
// y + max(ro, go, bo) is the max of the three bins because rounding and truncation are monotone.
export function max3(a: number, b: number, c: number): number {
  let d = a - b
  const m = a - (d & (d >> 31))
  d = m - c
  return m - (d & (d >> 31))
}

export function min3(a: number, b: number, c: number): number {
  let d = a - b
  const m = b + (d & (d >> 31))
  d = m - c
  return c + (d & (d >> 31))
}

/** Marks mask column `mc` on the rows rowEnd − n … rowEnd − 1 (a run that ended before rowEnd). */
export function markRun(k: Kernel, mc: number, rowEnd: number, n: number, mark: number): void {
  const { mask, maskRow } = k
  for (let r = rowEnd - n; r < rowEnd; r++) mask[maskRow[r]! + mc]! |= mark
}

/** The queue of ended runs: column, the unit's codes, and the run length. */
export class Queue {
  len = 0
  readonly x: Int32Array
  readonly a: Int32Array
  readonly b: Int32Array
  readonly c: Int32Array
  readonly d: Int32Array
  readonly n: Int32Array
  constructor(size: number) {
    this.x = new Int32Array(size); this.a = new Int32Array(size); this.b = new Int32Array(size)
    this.c = new Int32Array(size); this.d = new Int32Array(size); this.n = new Int32Array(size)
  }
}
