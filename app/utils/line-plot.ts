// The ECharts option of the line plot: our own IRE graticule, the luma trace, the composite
// envelope as a band and optional R', G', B' traces, over microseconds of the active line.
import { SETUP_IRE, SETUP_SPAN_IRE } from '../../shared/engine/scales'
import type { LineSampleJson } from './frame-api'
import { PLOT_COLOURS, PLOT_FONT } from './plot-style'

/** Graticule lines in IRE (7.5 setup scale); setup and white are the marked ones. */
export const LINE_GRATICULE_IRE = [-20, 0, 7.5, 20, 40, 60, 80, 100, 120] as const
const MARKED = new Set<number>([7.5, 100])

export interface LineTraces { r: boolean, g: boolean, b: boolean }

/** R', G', B' on the nominal 0..1 scale placed on the same IRE axis as luma (black 7.5, white 100). */
export function componentToIre(v: number): number {
  return SETUP_IRE + SETUP_SPAN_IRE * v
}

/** Axis range that always holds the whole graticule and every sample drawn. */
export function lineYRange(samples: LineSampleJson[], traces: LineTraces): { min: number, max: number } {
  let lo = -20
  let hi = 120
  for (const s of samples) {
    lo = Math.min(lo, s.compMinIre, s.lumaIre)
    hi = Math.max(hi, s.compMaxIre, s.lumaIre)
    for (const k of ['r', 'g', 'b'] as const) {
      if (traces[k]) {
        const v = componentToIre(s[k])
        lo = Math.min(lo, v)
        hi = Math.max(hi, v)
      }
    }
  }
  return { min: Math.floor((lo - 8) / 5) * 5, max: Math.ceil((hi + 8) / 5) * 5 }
}

const f1 = (v: number) => (Object.is(v, -0) ? 0 : v).toFixed(1)

/** The tooltip text of one sample (plain text lines joined by <br>; every value is a number we format). */
export function sampleTooltip(s: LineSampleJson): string {
  return [
    `Sample ${s.x} · ${s.us.toFixed(2)} µs`,
    `Luma ${f1(s.lumaIre)} IRE`,
    `Composite ${f1(s.compMinIre)} … ${f1(s.compMaxIre)} IRE`,
    `Chroma ${f1(s.chromaPpIre)} IRE p-p${s.phaseDeg === null ? '' : ` at ${s.phaseDeg.toFixed(1)}°`}`,
    `R′ ${f1(componentToIre(s.r))}  G′ ${f1(componentToIre(s.g))}  B′ ${f1(componentToIre(s.b))} IRE`,
  ].join('<br>')
}

export function linePlotOption(samples: LineSampleJson[], width: number, traces: LineTraces) {
  const usMax = samples.length ? samples[samples.length - 1]!.us : 0
  const y = lineYRange(samples, traces)
  const xy = (pick: (s: LineSampleJson) => number) => samples.map((s) => [s.us, pick(s)])
  const component = (key: 'r' | 'g' | 'b', name: string, color: string) => ({
    name, type: 'line', data: xy((s) => componentToIre(s[key])), showSymbol: false, silent: true,
    lineStyle: { width: 1, color, opacity: 0.9 }, itemStyle: { color }, z: 3,
  })
  const axisText = { color: PLOT_COLOURS.label, fontFamily: PLOT_FONT, fontSize: 11 }
  return {
    backgroundColor: PLOT_COLOURS.background,
    animation: false,
    grid: { left: 64, right: 20, top: 48, bottom: 48 },
    tooltip: {
      trigger: 'axis',
      axisPointer: { type: 'line', lineStyle: { color: PLOT_COLOURS.label } },
      backgroundColor: 'rgba(17, 20, 24, 0.95)', borderColor: PLOT_COLOURS.graticule,
      textStyle: { color: '#e6eaee', fontFamily: PLOT_FONT, fontSize: 12 },
      formatter: (params: Array<{ dataIndex: number }> | { dataIndex: number }) => {
        const first = Array.isArray(params) ? params[0] : params
        const s = first ? samples[first.dataIndex] : undefined
        return s ? sampleTooltip(s) : ''
      },
    },
    xAxis: [
      {
        // onZero off: the time axis belongs under the plot, not on the 0 IRE (blanking) line.
        type: 'value', position: 'bottom', min: 0, max: usMax, name: 'µs', nameLocation: 'middle', nameGap: 26,
        nameTextStyle: axisText, axisLabel: { ...axisText, showMaxLabel: false, formatter: (v: number) => v.toFixed(0) },
        axisLine: { onZero: false, lineStyle: { color: PLOT_COLOURS.graticule } }, splitLine: { show: false },
      },
      {
        // Same span as the microsecond axis, counted in samples, for reading a position off the file.
        type: 'value', position: 'top', min: 0, max: Math.max(0, width - 1), name: 'sample', nameLocation: 'middle', nameGap: 24,
        nameTextStyle: axisText, axisLabel: { ...axisText, showMaxLabel: false, formatter: (v: number) => v.toFixed(0) },
        axisLine: { onZero: false, lineStyle: { color: PLOT_COLOURS.graticule } }, splitLine: { show: false },
      },
    ],
    yAxis: {
      type: 'value', min: y.min, max: y.max, name: 'IRE (7.5 setup)', nameLocation: 'middle', nameRotate: 90, nameGap: 40, nameTextStyle: axisText,
      // Setup carries its own label on its line; a 7.5 on the axis would sit on top of the 0.
      axisLabel: { ...axisText, customValues: LINE_GRATICULE_IRE.filter((v) => v !== 7.5), formatter: (v: number) => String(v) },
      axisTick: { customValues: [...LINE_GRATICULE_IRE] },
      axisLine: { show: false }, splitLine: { show: false },
    },
    series: [
      {
        name: 'Luma', type: 'line', data: xy((s) => s.lumaIre), showSymbol: false, z: 4,
        lineStyle: { width: 1.5, color: PLOT_COLOURS.luma }, itemStyle: { color: PLOT_COLOURS.luma },
        markLine: {
          silent: true, symbol: 'none', animation: false,
          data: LINE_GRATICULE_IRE.map((v) => ({
            yAxis: v,
            lineStyle: MARKED.has(v)
              ? { color: PLOT_COLOURS.key, width: 1, type: v === 7.5 ? [6, 4] : 'solid' }
              : { color: PLOT_COLOURS.graticule, width: 1, type: 'solid' },
            label: MARKED.has(v)
              ? { show: true, position: 'insideEndTop', color: PLOT_COLOURS.key, fontFamily: PLOT_FONT, fontSize: 11, formatter: v === 7.5 ? 'setup 7.5' : 'white 100' }
              : { show: false },
          })),
        },
      },
      {
        // The band is the lower edge plus a stacked height; 'all' keeps the stack meaningful below 0 IRE.
        name: 'Composite min', type: 'line', stack: 'envelope', stackStrategy: 'all', data: xy((s) => s.compMinIre),
        showSymbol: false, silent: true, lineStyle: { width: 0.8, color: PLOT_COLOURS.envelope, opacity: 0.7 }, z: 2,
      },
      {
        name: 'Composite envelope', type: 'line', stack: 'envelope', stackStrategy: 'all', data: xy((s) => s.compMaxIre - s.compMinIre),
        showSymbol: false, silent: true, lineStyle: { width: 0.8, color: PLOT_COLOURS.envelope, opacity: 0.7 },
        areaStyle: { color: PLOT_COLOURS.envelopeFill }, z: 2,
      },
      ...(traces.r ? [component('r', 'R′', PLOT_COLOURS.red)] : []),
      ...(traces.g ? [component('g', 'G′', PLOT_COLOURS.green)] : []),
      ...(traces.b ? [component('b', 'B′', PLOT_COLOURS.blue)] : []),
    ],
  }
}
