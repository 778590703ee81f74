// The ECharts option of a histogram panel: share of pixels per code, one trace per channel,
// with the studio-range limits marked where the codes are studio-range codes.
import type { FrameHistogramsJson } from './frame-api'
import { PLOT_COLOURS, PLOT_FONT } from './plot-style'

export type HistogramChannel = 'y' | 'cb' | 'cr' | 'r' | 'g' | 'b'

export const CHANNEL_LABELS: Record<HistogramChannel, string> = { y: 'Y′', cb: 'Cb', cr: 'Cr', r: 'R′', g: 'G′', b: 'B′' }
const CHANNEL_COLOURS: Record<HistogramChannel, string> = {
  y: PLOT_COLOURS.luma, cb: PLOT_COLOURS.cb, cr: PLOT_COLOURS.cr, r: PLOT_COLOURS.red, g: PLOT_COLOURS.green, b: PLOT_COLOURS.blue,
}

/** Percent of the picture in each bin: frames of different sizes then share one vertical scale. */
export function histogramShares(counts: ArrayLike<number>): number[] {
  let total = 0
  for (let i = 0; i < counts.length; i++) total += counts[i]!
  const out = new Array<number>(counts.length)
  for (let i = 0; i < counts.length; i++) out[i] = total ? (counts[i]! / total) * 100 : 0
  return out
}

/**
 * Studio-range limits on the code axis at the histogram's depth (BT.601 Table 3: luma 16–235,
 * chroma 16–240 at 8 bits, ×4 at 10 bits). R, G, B of a full-range source are the file's own
 * codes, where those limits mean nothing.
 */
export function histogramLimits(h: Pick<FrameHistogramsJson, 'bins' | 'rgbCoding'>, channels: HistogramChannel[]): number[] {
  const k = h.bins / 256
  const rgb = channels.some((c) => c === 'r' || c === 'g' || c === 'b')
  if (rgb) return h.rgbCoding === 'source-full' ? [] : [16 * k, 235 * k]
  const chroma = channels.every((c) => c === 'cb' || c === 'cr')
  return chroma ? [16 * k, 240 * k] : channels.includes('cb') || channels.includes('cr') ? [16 * k, 235 * k, 240 * k] : [16 * k, 235 * k]
}

export function histogramOption(h: FrameHistogramsJson, channels: HistogramChannel[]) {
  const axisText = { color: PLOT_COLOURS.label, fontFamily: PLOT_FONT, fontSize: 10 }
  const depth = Math.round(Math.log2(h.bins))
  const limits = histogramLimits(h, channels)
  return {
    backgroundColor: PLOT_COLOURS.background,
    animation: false,
    grid: { left: 44, right: 12, top: 14, bottom: 30 },
    tooltip: {
      trigger: 'axis',
      backgroundColor: 'rgba(17, 20, 24, 0.95)', borderColor: PLOT_COLOURS.graticule,
      textStyle: { color: '#e6eaee', fontFamily: PLOT_FONT, fontSize: 12 },
      valueFormatter: (v: number) => `${Number(v).toFixed(3)} %`,
    },
    xAxis: {
      type: 'value', min: 0, max: h.bins - 1, name: `${depth}-bit code`, nameLocation: 'middle', nameGap: 20,
      nameTextStyle: axisText, axisLabel: axisText, splitLine: { show: false },
      axisLine: { lineStyle: { color: PLOT_COLOURS.graticule } },
    },
    yAxis: {
      type: 'value', min: 0, axisLabel: { ...axisText, formatter: (v: number) => `${v}%` },
      splitLine: { lineStyle: { color: PLOT_COLOURS.graticule, opacity: 0.5 } },
    },
    series: channels.map((c, i) => ({
      name: CHANNEL_LABELS[c], type: 'line', step: 'middle', showSymbol: false,
      data: histogramShares(h[c]).map((v, code) => [code, v]),
      lineStyle: { width: 1, color: CHANNEL_COLOURS[c] }, itemStyle: { color: CHANNEL_COLOURS[c] },
      areaStyle: c === 'y' ? { color: CHANNEL_COLOURS[c], opacity: 0.25 } : undefined,
      ...(i === 0 && limits.length
        ? { markLine: { silent: true, symbol: 'none', animation: false, label: { show: false }, lineStyle: { color: PLOT_COLOURS.key, type: [4, 3], width: 1 }, data: limits.map((x) => ({ xAxis: x })) } }
        : {}),
    })),
  }
}

export function channelColour(c: HistogramChannel): string {
  return CHANNEL_COLOURS[c]
}
