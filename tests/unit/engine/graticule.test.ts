// Scale marks written over the scope images. Level values: black 16 / white 235 in 8-bit and
// 64 / 940 in 10-bit studio codes (ITU-R BT.601-7 and BT.709-6, quantisation of Y' — memory);
// 700 mV component white (common practice); 7.5 IRE setup is black on the NTSC scale
// (SMPTE 170M — memory). The skin-tone line at 123° is common practice.
import { describe, expect, it } from 'vitest'
import { barTargets, renderWaveform, WAVEFORM_ROWS } from '../../../shared/engine'
import { SKIN_TONE_DEGREES, vectorscopeMarks, vectorscopePoint, waveformScaleMarks } from '../../../shared/engine/graticule'

const byIre = (scale: Parameters<typeof waveformScaleMarks>[0]) => Object.fromEntries(waveformScaleMarks(scale).map((m) => [m.ire, m.label]))

describe('waveform scale marks follow the unit', () => {
  it('IRE: the lines as drawn, with setup and white as key lines', () => {
    expect(byIre('ire')).toEqual({ '-20': '−20', '0': '0', '7.5': '7.5', '20': '20', '40': '40', '60': '60', '80': '80', '100': '100', '120': '120' })
    expect(waveformScaleMarks('ire').filter((m) => m.key).map((m) => m.ire).sort()).toEqual([100, 7.5])
  })
  it('black and white read 64 and 940 in 10-bit codes, 16 and 235 in 8-bit', () => {
    expect([byIre('code10')['7.5'], byIre('code10')['100']]).toEqual(['64', '940'])
    expect([byIre('code8')['7.5'], byIre('code8')['100']]).toEqual(['16', '235'])
  })
  it('black and white read 0 and 100 in percent, 0 and 700 in component mV', () => {
    expect([byIre('pct')['7.5'], byIre('pct')['100']]).toEqual(['0', '100'])
    expect([byIre('mv')['7.5'], byIre('mv')['100']]).toEqual(['0', '700'])
  })
  it('sits each mark on the row its line is drawn on (the key colour at white)', () => {
    const img = renderWaveform({ columns: 8, rows: WAVEFORM_ROWS, luma: new Uint32Array(8 * WAVEFORM_ROWS), flat: new Uint32Array(8 * WAVEFORM_ROWS), rgb: { r: new Uint32Array(8 * WAVEFORM_ROWS), g: new Uint32Array(8 * WAVEFORM_ROWS), b: new Uint32Array(8 * WAVEFORM_ROWS) } } as never)
    for (const m of waveformScaleMarks('ire')) {
      const row = Math.floor(m.y * img.height)
      const o = (row * img.width + img.width - 1) * 4
      // A line of the graticule (not the background) at the mark's row.
      expect(img.data[o]! + img.data[o + 1]! + img.data[o + 2]!, `line at ${m.ire} IRE`).toBeGreaterThan(13 + 16 + 22)
    }
  })
})

describe('vectorscope marks', () => {
  it('labels every 75 % target just outside it, away from the centre', () => {
    const { targets } = vectorscopeMarks('601')
    const centre = vectorscopePoint(0, 0)
    for (const t of barTargets(0.75, '601')) {
      const m = targets.find((x) => x.name === t.name)!
      const at = vectorscopePoint(t.u, t.v)
      expect(Math.hypot(m.x - centre.x, m.y - centre.y)).toBeGreaterThan(Math.hypot(at.x - centre.x, at.y - centre.y))
    }
  })
  it('draws the skin-tone line at 123° (U right, V up): up and to the left, between the red and yellow targets', () => {
    const { skinTone } = vectorscopeMarks('709')
    const deg = (Math.atan2(-(skinTone.to.y - skinTone.from.y), skinTone.to.x - skinTone.from.x) * 180) / Math.PI
    expect(deg).toBeCloseTo(SKIN_TONE_DEGREES, 6)
    const angle = (name: string) => { const t = barTargets(0.75, '709').find((x) => x.name === name)!; return (Math.atan2(t.v, t.u) * 180) / Math.PI }
    expect(angle('red')).toBeLessThan(SKIN_TONE_DEGREES)
    expect(angle('yellow')).toBeGreaterThan(SKIN_TONE_DEGREES)
  })
})
