// Clicking the picture selects a line of the frame; the line plot's graticule and traces.
// Sources: IRE levels of SMPTE 170M (memory; −20 IRE is NTSC practice),
// ITU-R BT.601 sampling (13.5 MHz, 720 active samples = 53.333 µs).
import { describe, expect, it } from 'vitest'
import { lineAtOffset, lineMarkerPercent, parseLineQuery } from '../../../app/utils/picture'
import { componentToIre, LINE_GRATICULE_IRE, linePlotOption, lineYRange, sampleTooltip } from '../../../app/utils/line-plot'
import { histogramLimits, histogramShares } from '../../../app/utils/histogram-plot'
import { waveformPanes } from '../../../app/utils/scope-views'
import type { LineSampleJson } from '../../../app/utils/frame-api'

describe('line under a click', () => {
  it('maps the height of a click to the frame line, whatever size the picture is shown at', () => {
    // A 480-line frame shown 240 px tall: each screen pixel covers two lines.
    expect(lineAtOffset(0, 240, 480)).toBe(0)
    expect(lineAtOffset(120, 240, 480)).toBe(240)
    expect(lineAtOffset(239.9, 240, 480)).toBe(479)
    // A 1080-line frame shown 540.5 px tall.
    expect(lineAtOffset(270.25, 540.5, 1080)).toBe(540)
  })

  it('stays inside the picture at and beyond its edges', () => {
    expect(lineAtOffset(-3, 240, 480)).toBe(0)
    expect(lineAtOffset(240, 240, 480)).toBe(479)
    expect(lineAtOffset(10, 0, 480)).toBe(0)
  })

  it('puts the marker at the middle of the line', () => {
    expect(lineMarkerPercent(0, 480)).toBeCloseTo(100 * 0.5 / 480, 12)
    expect(lineMarkerPercent(240, 480)).toBeCloseTo(50 + 100 * 0.5 / 480, 12)
    // Round trip: the marker of a line sits over that same line.
    for (const n of [0, 17, 239, 479]) expect(lineAtOffset(lineMarkerPercent(n, 480) / 100 * 333, 333, 480)).toBe(n)
  })

  it('reads ?line= only when it names a line of this frame', () => {
    expect(parseLineQuery('240', 480)).toBe(240)
    expect(parseLineQuery(['12', '13'], 480)).toBe(12)
    expect(parseLineQuery('480', 480)).toBeNull()
    expect(parseLineQuery('-1', 480)).toBeNull()
    expect(parseLineQuery('2.5', 480)).toBeNull()
    expect(parseLineQuery(undefined, 480)).toBeNull()
  })
})

const sample = (x: number, lumaIre: number, c = 0, rgb: [number, number, number] = [0.5, 0.5, 0.5]): LineSampleJson => ({
  x, us: x / 13.5, lumaIre, compMinIre: lumaIre - c, compMaxIre: lumaIre + c, chromaPpIre: 2 * c, phaseDeg: c ? 167.1 : null, r: rgb[0], g: rgb[1], b: rgb[2],
})

describe('line plot', () => {
  it('draws our IRE graticule with setup and white marked', () => {
    // SMPTE 170M: setup 7.5, white 100, composite peak 120 (BT.1700); −20 is NTSC practice.
    expect([...LINE_GRATICULE_IRE]).toEqual([-20, 0, 7.5, 20, 40, 60, 80, 100, 120])
    const opt = linePlotOption([sample(0, 50), sample(719, 60)], 720, { r: false, g: false, b: false })
    const marks = (opt.series[0] as { markLine: { data: Array<{ yAxis: number, label: { show: boolean } }> } }).markLine.data
    expect(marks.map((m) => m.yAxis)).toEqual([...LINE_GRATICULE_IRE])
    expect(marks.filter((m) => m.label.show).map((m) => m.yAxis)).toEqual([7.5, 100])
  })

  it('spans the active line in microseconds and in samples', () => {
    // BT.601: 720 samples at 13.5 MHz; the last sample starts at 719/13.5 = 53.26 µs.
    const opt = linePlotOption([sample(0, 50), sample(719, 60)], 720, { r: false, g: false, b: false })
    expect(opt.xAxis[0]!.max).toBeCloseTo(719 / 13.5, 9)
    expect(opt.xAxis[1]!.max).toBe(719)
  })

  it('adds R′, G′, B′ traces only when asked, on the luma IRE scale', () => {
    const s = [sample(0, 50, 0, [1, 0, 0])]
    expect(linePlotOption(s, 720, { r: false, g: false, b: false }).series).toHaveLength(3)
    const withRgb = linePlotOption(s, 720, { r: true, g: false, b: true }).series
    expect(withRgb.map((x) => x.name)).toEqual(['Luma', 'Composite min', 'Composite envelope', 'R′', 'B′'])
    // SMPTE 170M: nominal 1 = white 100 IRE, 0 = black 7.5 IRE on the setup scale.
    expect(componentToIre(1)).toBe(100)
    expect(componentToIre(0)).toBe(7.5)
  })

  it('builds the composite band from its lower edge and its height', () => {
    // SMPTE EG 1 bars (computed): 75 % yellow, luma 69.0 IRE with chroma 62.1 IRE p-p → 38.0 … 100.0 IRE.
    const opt = linePlotOption([sample(0, 69, 31.05)], 720, { r: false, g: false, b: false })
    const low = opt.series[1] as { data: number[][] }
    const band = opt.series[2] as { data: number[][] }
    expect(low.data[0]![1]).toBeCloseTo(37.95, 9)
    expect(low.data[0]![1]! + band.data[0]![1]!).toBeCloseTo(100.05, 9)
  })

  it('widens the axis to hold the whole graticule and any excursion', () => {
    expect(lineYRange([sample(0, 50)], { r: false, g: false, b: false })).toEqual({ min: -30, max: 130 })
    // SMPTE 170M: 100 % bars reach +130.8 IRE; the axis must still show them.
    const wide = lineYRange([sample(0, 89.5, 41.3)], { r: false, g: false, b: false })
    expect(wide.max).toBeGreaterThanOrEqual(130.8)
    expect(sampleTooltip(sample(27, 69, 31))).toContain('Composite 38.0 … 100.0 IRE')
  })
})

describe('histogram and waveform helpers', () => {
  it('turns counts into percent of the picture', () => {
    expect(histogramShares([0, 1, 3])).toEqual([0, 25, 75])
    expect(histogramShares([0, 0])).toEqual([0, 0])
  })

  it('marks the studio-range limits at the histogram depth (ITU-R BT.601-7 Table 3 — memory)', () => {
    expect(histogramLimits({ bins: 256, rgbCoding: 'studio' }, ['y'])).toEqual([16, 235])
    expect(histogramLimits({ bins: 1024, rgbCoding: 'studio' }, ['cb', 'cr'])).toEqual([64, 960])
    // R, G, B of a full-range file are its own codes: no studio limits apply.
    expect(histogramLimits({ bins: 256, rgbCoding: 'source-full' }, ['r', 'g', 'b'])).toEqual([])
  })

  it('shows luma and flat side by side for "both"', () => {
    expect(waveformPanes('both').map((p) => p.kind)).toEqual(['waveform-luma', 'waveform-flat'])
    expect(waveformPanes('rgb').map((p) => p.kind)).toEqual(['waveform-rgb'])
  })
})
