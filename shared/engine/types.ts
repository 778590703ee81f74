import type { DeliverySpec } from './specs'

export type MatrixName = '601' | '709'
export type SourceRange = 'full' | 'studio'

export interface RgbFrameInput {
  kind: 'rgb'
  data: Uint8Array | Uint16Array
  width: number
  height: number
  channels: 3 | 4
  bitDepth: 8 | 16
  range: SourceRange
}

/** 8-bit 4:2:2, bytes Cb Y0 Cr Y1 per pixel pair, rows packed without padding. */
export interface UyvyFrameInput {
  kind: 'uyvy'
  data: Uint8Array
  width: number
  height: number
}

/** 10-bit 4:2:2, six pixels in four little-endian 32-bit words, rows padded to 128 bytes. */
export interface V210FrameInput {
  kind: 'v210'
  data: Uint8Array
  width: number
  height: number
}

export interface PlanarFrameInput {
  kind: 'planar'
  y: Uint8Array | Uint16Array
  cb: Uint8Array | Uint16Array
  cr: Uint8Array | Uint16Array
  width: number
  height: number
  bitDepth: 8 | 10
  subsampling: '422' | '444'
}

export type FrameInput = RgbFrameInput | UyvyFrameInput | V210FrameInput | PlanarFrameInput

export interface AnalyseOptions {
  matrix?: MatrixName
  spec?: DeliverySpec
  keepDensities?: boolean
  /** Width of the range mask made with the densities (default MASK_DEFAULT_WIDTH, never wider than the frame). */
  maskWidth?: number
  /**
   * false: leave out the spatial distributions (low-pass and 3×3-region levels, lowpass.ts),
   * a second pass over the picture, unless the spec judges a limit on them. For callers that
   * never judge the stored levels again against another spec (a clip's timeline). Default true.
   */
  spatialLevels?: boolean
  /** Reusable buffers for the densities and mask (analyse.ts AnalysisScratch); they then hold only until its next use. */
  scratch?: { u32(name: string, n: number): Uint32Array, u8(name: string, n: number): Uint8Array }
}

/**
 * Blocks of the picture holding a pixel beyond the spec's limits: data[row · width + col]
 * has MASK_HIGH set if a pixel in the block is above a max limit, MASK_LOW if below a min.
 */
export interface RangeMask {
  width: number
  height: number
  data: Uint8Array
}

export interface LumaStats {
  min: number
  p1: number
  p10: number
  p50: number
  mean: number
  p90: number
  p99: number
  max: number
}

export interface Shares {
  belowBlack: number
  aboveWhite: number
  compositeOut: number
  gamutOut: number
  clipped: number
  crushed: number
  /** Luma outside 16–235 or Cb/Cr outside 16–240 (8-bit codes): the studio-range test of BT.601 Table 3. */
  studioOut: number
}

export type Verdict = 'pass' | 'caution' | 'fail'

export interface VerdictReason {
  /** The limit's id in the delivery spec. */
  limit: string
  /** Measured extreme of the quantity, in the limit's unit. */
  value: number
  /** Share of the picture (0..1) beyond the threshold that triggered the reason. */
  share: number
  severity: 'caution' | 'fail'
  unit: string
  threshold: number
  message: string
}

/**
 * Level distributions on the 8-bit-equivalent code scale, bins centred on multiples of
 * LEVEL_BIN_STEP starting at LEVEL_MIN. Kept so that a spec can be evaluated (or re-evaluated
 * after a user edits it) without touching the pixels again.
 */
export interface LevelDistributions {
  min: number
  step: number
  luma: Uint32Array
  compMax: Uint32Array
  compMin: Uint32Array
  rgbMax: Uint32Array
  rgbMin: Uint32Array
  /** Each of R', G', B' on the same code scale (16 = 0, 235 = 1). */
  r: Uint32Array
  g: Uint32Array
  b: Uint32Array
  /**
   * Per-pixel max and min of R', G', B' after the spatial low-pass filter of lowpass.ts (EBU R 103
   * practice). Absent from analyses stored before it was measured.
   */
  rgbMaxLp?: Uint32Array
  rgbMinLp?: Uint32Array
  /**
   * 3×3 minimum (for max bounds) and maximum (for min bounds) of luma, the composite envelope
   * and the R'G'B' extremes: what counts when a limit asks for a region of at least 3×3 pixels.
   */
  lumaMaxR3?: Uint32Array
  lumaMinR3?: Uint32Array
  compMaxR3?: Uint32Array
  compMinR3?: Uint32Array
  rgbMaxR3?: Uint32Array
  rgbMinR3?: Uint32Array
}

export interface Histograms {
  /** 256 for 8-bit sources, 1024 above. Y/Cb/Cr bins are studio-range codes at that depth. */
  bins: number
  y: Uint32Array
  cb: Uint32Array
  cr: Uint32Array
  /** R, G, B bins are the source's own codes for RGB input, studio-range codes for Y'CbCr input. */
  rgbCoding: 'source-full' | 'source-studio' | 'studio'
  r: Uint32Array
  g: Uint32Array
  b: Uint32Array
  levels: LevelDistributions
}

export interface WaveformDensity {
  columns: number
  rows: number
  /** Vertical axis in IRE (7.5 setup): row 0 is ireBottom, row rows−1 reaches ireTop; row-major, rows × columns. */
  ireBottom: number
  ireTop: number
  /** Source columns folded into one density column. */
  decimation: number
  luma: Uint32Array
  flat: Uint32Array
  rgb: { r: Uint32Array, g: Uint32Array, b: Uint32Array }
}

export interface VectorscopeDensity {
  size: number
  /** U and V span -extent..+extent across the grid. */
  extent: number
  data: Uint32Array
}

export interface FrameAnalysis {
  width: number
  height: number
  bitDepth: number
  matrix: MatrixName
  range: SourceRange
  luma: LumaStats
  lumaIre: { min: number, mean: number, max: number }
  compositeIre: { min: number, max: number }
  chroma: { cbMin: number, cbMax: number, crMin: number, crMax: number, ppMaxIre: number }
  shares: Shares
  verdict: Verdict
  reasons: VerdictReason[]
  histograms: Histograms
  waveform?: WaveformDensity
  vectorscope?: VectorscopeDensity
  /** With the densities: where the picture is beyond the spec's limits (mask.ts). */
  rangeMask?: RangeMask
}

export interface LineSample {
  x: number
  us: number
  lumaIre: number
  compMinIre: number
  compMaxIre: number
  chromaPpIre: number
  /** null where the sample carries no chroma (phase undefined). */
  phaseDeg: number | null
  /** R', G', B' on the nominal 0..1 scale (values beyond are kept). */
  r: number
  g: number
  b: number
}

export interface LinePlot {
  index: number
  samples: LineSample[]
}

export interface RgbaImage {
  width: number
  height: number
  data: Uint8ClampedArray
}
