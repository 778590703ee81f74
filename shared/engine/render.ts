import { barTargets, resolveMatrix } from './matrix'
import { PALETTE, type Rgb } from './palette'
import { SKIN_TONE_DEGREES, WAVEFORM_GRATICULE_IRE } from './graticule'
import { ireToCode8 } from './scales'
import { waveformRow } from './waveform'
import type { Histograms, MatrixName, RgbaImage, VectorscopeDensity, WaveformDensity } from './types'


/**
 * Where a caller that draws image after image wants the pixels: given the byte count, a
 * buffer of its own to draw into (reused from job to job, so the collector is not handed a
 * new image of a few MB each time). The image then holds only until the buffer's next use.
 */
export type ImageBuffer = (bytes: number) => Uint8ClampedArray

/** A copy of a cached layer to draw on: into the caller's buffer when one is given. */
function startFrom(base: Uint8ClampedArray, out: ImageBuffer | undefined): Uint8ClampedArray {
  if (!out) return new Uint8ClampedArray(base)
  const data = out(base.length)
  data.set(base)
  return data
}

class Canvas {
  readonly data: Uint8ClampedArray
  constructor(readonly width: number, readonly height: number, bg: Rgb) {
    this.data = new Uint8ClampedArray(width * height * 4)
    for (let i = 0; i < width * height; i++) {
      this.data[i * 4] = bg[0]; this.data[i * 4 + 1] = bg[1]; this.data[i * 4 + 2] = bg[2]; this.data[i * 4 + 3] = 255
    }
  }

  set(x: number, y: number, c: Rgb): void {
    if (x < 0 || y < 0 || x >= this.width || y >= this.height) return
    const i = ((y | 0) * this.width + (x | 0)) * 4
    // Alpha too: a layer drawn on a transparent canvas is then known by what was painted.
    this.data[i] = c[0]; this.data[i + 1] = c[1]; this.data[i + 2] = c[2]; this.data[i + 3] = 255
  }

  add(x: number, y: number, c: Rgb, k: number): void {
    const i = (y * this.width + x) * 4
    this.data[i] = this.data[i]! + c[0] * k
    this.data[i + 1] = this.data[i + 1]! + c[1] * k
    this.data[i + 2] = this.data[i + 2]! + c[2] * k
  }

  hline(x0: number, x1: number, y: number, c: Rgb, dash = 0): void {
    for (let x = x0; x < x1; x++) if (!dash || ((x - x0) % (2 * dash)) < dash) this.set(x, y, c)
  }

  vline(x: number, y0: number, y1: number, c: Rgb): void {
    for (let y = y0; y < y1; y++) this.set(x, y, c)
  }

  image(): RgbaImage {
    return { width: this.width, height: this.height, data: this.data }
  }
}

// log scaling: a lone pixel stays visible while a flat field saturates.
function intensity(count: number, ref: number): number {
  if (!count) return 0
  const k = Math.log1p(count) / Math.log1p(ref)
  return k > 1 ? 1 : k
}

/**
 * What one trace adds to a pixel's R, G, B for each cell count, up to the count where the
 * trace saturates (every larger count adds the last entry). Built once per image, so the
 * per-cell work is a table read and an add; the products are formed in the same order as a
 * per-cell `intensity() · weight · colour` would be, so the picture is the same to the bit.
 */
function traceTable(ref: number, c: Rgb, weight: number): { r: Float64Array, g: Float64Array, b: Float64Array, last: number } {
  // intensity() reaches 1 at any count ≥ ref, so ⌈ref⌉ is the last count that needs its own entry.
  const last = Math.ceil(ref)
  const r = new Float64Array(last + 1); const g = new Float64Array(last + 1); const b = new Float64Array(last + 1)
  for (let n = 1; n <= last; n++) {
    const k = intensity(n, ref) * weight
    r[n] = c[0] * k; g[n] = c[1] * k; b[n] = c[2] * k
  }
  return { r, g, b, last }
}

/**
 * Background and graticule layers depend only on an image's geometry, and a reel's frames
 * share one: each worker thread (or browser tab) draws a geometry once and copies it after.
 * A handful of entries covers the frame sizes a session meets; the oldest goes first.
 */
const LAYER_CACHE_SIZE = 8
const layerCache = new Map<string, { base: Uint8ClampedArray, over?: { at: Int32Array, rgb: Uint8Array } }>()

function cachedLayer<T extends { base: Uint8ClampedArray, over?: { at: Int32Array, rgb: Uint8Array } }>(key: string, draw: () => T): T {
  let hit = layerCache.get(key) as T | undefined
  if (!hit) {
    hit = draw()
    if (layerCache.size >= LAYER_CACHE_SIZE) layerCache.delete(layerCache.keys().next().value!)
    layerCache.set(key, hit)
  }
  return hit
}

/** Pixels a canvas painted (alpha 255) as indices and colours, to be set over a trace in one pass. */
function paintedPixels(cv: Canvas): { at: Int32Array, rgb: Uint8Array } {
  const at: number[] = []
  const d = cv.data
  for (let i = 0; i < cv.width * cv.height; i++) if (d[i * 4 + 3] === 255) at.push(i)
  const rgb = new Uint8Array(at.length * 3)
  at.forEach((p, j) => { rgb[j * 3] = d[p * 4]!; rgb[j * 3 + 1] = d[p * 4 + 1]!; rgb[j * 3 + 2] = d[p * 4 + 2]! })
  return { at: Int32Array.from(at), rgb }
}

export type WaveformMode = 'luma' | 'flat' | 'both' | 'rgb'

const GUTTER = 22
const PANE_GAP = 4

function waveformGraticule(width: number, rows: number): Uint8ClampedArray {
  const cv = new Canvas(width, rows, PALETTE.background)
  // Graticule lines go through the same level-to-row mapping as the trace.
  const rowOf = (ire: number) => rows - 1 - waveformRow(ireToCode8(ire))
  // The numbers are written beside the image as text by the page and the PDF (graticule.ts),
  // at a readable size and in the reader's unit; the gutter carries a tick for each line.
  for (const ire of WAVEFORM_GRATICULE_IRE) {
    const y = rowOf(ire)
    cv.hline(GUTTER - 6, width, y, PALETTE.graticule)
  }
  cv.hline(GUTTER - 6, width, rowOf(100), PALETTE.keyLine)
  cv.hline(GUTTER - 6, width, rowOf(7.5), PALETTE.keyLine, 3)
  return cv.data
}

/** Waveform (luma, flat, both overlaid, or the RGB split side by side) with an IRE graticule. */
export function renderWaveform(w: WaveformDensity, mode: WaveformMode = 'luma', out?: ImageBuffer): RgbaImage {
  const panes = mode === 'rgb' ? 3 : 1
  const { columns, rows } = w
  const width = GUTTER + panes * columns + (panes - 1) * PANE_GAP
  const { base } = cachedLayer(`waveform ${width}×${rows}`, () => ({ base: waveformGraticule(width, rows) }))
  const data = startFrom(base, out)

  // Full brightness at a sixteenth of a column's pixels in one cell: flat areas saturate,
  // a lone pixel still shows.
  const ref = Math.max(2, totalOf(w.luma) / columns / 16)
  const layers: Array<{ d: Uint32Array, c: Rgb, pane: number, k: number }> = []
  if (mode === 'luma' || mode === 'both') layers.push({ d: w.luma, c: PALETTE.lumaTrace, pane: 0, k: 1 })
  if (mode === 'flat' || mode === 'both') layers.push({ d: w.flat, c: PALETTE.flatTrace, pane: 0, k: mode === 'both' ? 0.8 : 1 })
  if (mode === 'rgb') {
    layers.push({ d: w.rgb.r, c: PALETTE.red, pane: 0, k: 1 }, { d: w.rgb.g, c: PALETTE.green, pane: 1, k: 1 }, { d: w.rgb.b, c: PALETTE.blue, pane: 2, k: 1 })
  }
  for (const layer of layers) {
    const x0 = GUTTER + layer.pane * (columns + PANE_GAP)
    const { r: tr, g: tg, b: tb, last } = traceTable(ref, layer.c, layer.k)
    const d = layer.d
    for (let row = 0; row < rows; row++) {
      // Density row 0 is the bottom of the picture.
      let o = ((rows - 1 - row) * width + x0) * 4
      const end = (row + 1) * columns
      for (let i = row * columns; i < end; i++, o += 4) {
        const n = d[i]!
        if (n === 0) continue
        const t = n < last ? n : last
        // Uint8ClampedArray rounds and clips on store, as the trace always has.
        data[o] = data[o]! + tr[t]!
        data[o + 1] = data[o + 1]! + tg[t]!
        data[o + 2] = data[o + 2]! + tb[t]!
      }
    }
  }
  return { width, height: rows, data }
}

function totalOf(d: Uint32Array): number {
  let s = 0
  for (let i = 0; i < d.length; i++) s += d[i]!
  return s
}

/**
 * The vectorscope's fixed parts: what lies under the trace (axes, rings, burst stub) and what
 * is drawn over it (bar targets and their letters), for one size, scale and matrix.
 */
function vectorscopeLayers(v: VectorscopeDensity, matrix: MatrixName, scale: number) {
  const size = v.size * scale
  const px = (u: number) => Math.floor((u + v.extent) / (2 * v.extent) * size)
  const py = (vv: number) => Math.floor((v.extent - vv) / (2 * v.extent) * size)
  const under = new Canvas(size, size, PALETTE.background)
  const cx = px(0); const cy = py(0)
  under.hline(0, size, cy, PALETTE.graticule)
  under.vline(cx, 0, size, PALETTE.graticule)
  // Rings every 0.1 of chroma amplitude: read off saturation without a separate scale.
  for (let ring = 0.1; ring < v.extent; ring += 0.1) {
    const rpx = ring / (2 * v.extent) * size
    const steps = Math.ceil(rpx * 8)
    for (let i = 0; i < steps; i += 2) {
      const a = (i / steps) * 2 * Math.PI
      under.set(Math.round(cx + rpx * Math.cos(a)), Math.round(cy - rpx * Math.sin(a)), PALETTE.graticule)
    }
  }
  // Burst sits at 180° (SMPTE 170M — memory): a short stub on the −U axis.
  under.hline(px(-0.15), cx, cy + 1, PALETTE.graticuleLabel)
  // Skin-tone line (the I axis, common practice): dots in our skin-tone colour from the
  // centre to the edge, under the trace so a face's cluster reads against it.
  const skin = (SKIN_TONE_DEGREES * Math.PI) / 180
  const reach = v.extent * 0.97
  const dots = Math.ceil((reach / (2 * v.extent)) * size)
  for (let i = 0; i < dots; i += 1) {
    if (i % 6 > 3) continue
    const r = (i / dots) * reach
    under.set(px(r * Math.cos(skin)), py(r * Math.sin(skin)), PALETTE.skinTone)
  }

  // Targets are painted over the trace, so they stay legible where the picture has bars.
  const over = new Canvas(size, size, PALETTE.background)
  over.data.fill(0)
  for (const t of barTargets(0.75, matrix)) {
    // 75 % targets: a hollow ring of our own size; 100 % targets: a small plus.
    const x = px(t.u); const y = py(t.v)
    for (let i = 0; i < 48; i++) {
      const a = i / 48 * 2 * Math.PI
      over.set(Math.round(x + 6 * Math.cos(a)), Math.round(y + 6 * Math.sin(a)), PALETTE.keyLine)
    }
  }
  for (const t of barTargets(1, matrix)) {
    const x = px(t.u); const y = py(t.v)
    over.hline(x - 4, x + 5, y, PALETTE.keyLine)
    over.vline(x, y - 4, y + 5, PALETTE.keyLine)
  }
  return { base: under.data, over: paintedPixels(over) }
}

/** Vectorscope (U right, V up) with the 75 % and 100 % bar targets of the given matrix. */
export function renderVectorscope(v: VectorscopeDensity, opts: { matrix?: MatrixName, scale?: number, out?: ImageBuffer } = {}): RgbaImage {
  const matrix = resolveMatrix(opts.matrix)
  const scale = Math.max(1, Math.floor(opts.scale ?? 2))
  const size = v.size * scale
  const { base, over } = cachedLayer(`vectorscope ${v.size}/${v.extent}×${scale} ${matrix}`, () => vectorscopeLayers(v, matrix, scale))
  const data = startFrom(base, opts.out)

  const ref = Math.max(2, totalOf(v.data) / 400)
  const { r: tr, g: tg, b: tb, last } = traceTable(ref, PALETTE.vectorTrace, 1)
  for (let r = 0; r < v.size; r++) {
    for (let c = 0; c < v.size; c++) {
      const n = v.data[r * v.size + c]!
      if (!n) continue
      const t = n < last ? n : last
      const ar = tr[t]!; const ag = tg[t]!; const ab = tb[t]!
      for (let dy = 0; dy < scale; dy++) {
        let o = ((r * scale + dy) * size + c * scale) * 4
        for (let dx = 0; dx < scale; dx++, o += 4) {
          data[o] = data[o]! + ar; data[o + 1] = data[o + 1]! + ag; data[o + 2] = data[o + 2]! + ab
        }
      }
    }
  }
  const { at, rgb } = over!
  for (let j = 0; j < at.length; j++) {
    const o = at[j]! * 4
    data[o] = rgb[j * 3]!; data[o + 1] = rgb[j * 3 + 1]!; data[o + 2] = rgb[j * 3 + 2]!
  }
  return { width: size, height: size, data }
}

/** Histograms of Y (filled) with R, G, B outlines, 0…bins−1 across. */
export function renderHistogram(h: Histograms, opts: { height?: number } = {}): RgbaImage {
  const height = opts.height ?? 160
  const width = 512
  const cv = new Canvas(width, height, PALETTE.background)
  const binOf = (x: number) => Math.floor(x * h.bins / width)
  const col = (d: Uint32Array, x: number) => {
    const a = binOf(x); const b = Math.max(a + 1, binOf(x + 1))
    let s = 0
    for (let i = a; i < b; i++) s += d[i]!
    return s / (b - a)
  }
  const peak = (d: Uint32Array) => {
    let m = 1
    for (let x = 0; x < width; x++) m = Math.max(m, col(d, x))
    return m
  }
  const py = peak(h.y)
  for (let x = 0; x < width; x++) {
    const top = Math.round((col(h.y, x) / py) * (height - 1))
    for (let y = 0; y < top; y++) cv.add(x, height - 1 - y, PALETTE.lumaTrace, 0.45)
  }
  for (const [d, c] of [[h.r, PALETTE.red], [h.g, PALETTE.green], [h.b, PALETTE.blue]] as const) {
    const p = peak(d)
    for (let x = 0; x < width; x++) cv.set(x, height - 1 - Math.round((col(d, x) / p) * (height - 1)), c)
  }
  // Studio black and white on the histogram's code axis, drawn over the bars.
  const k = h.bins / 256
  for (const code of [16 * k, 235 * k]) cv.vline(Math.round(code * width / h.bins), 0, height, PALETTE.keyLine)
  return cv.image()
}
