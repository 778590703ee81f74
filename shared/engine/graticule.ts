// Where the scopes' scale marks go and what they say, as fractions of the image, so that the
// browser and the PDF write them as real text at a readable size over the stored images
// (which carry the lines and the trace, not the text). Labels follow the reader's unit.
import { barTargets } from './matrix'
import { ireToCode8, toScale, type LevelScale } from './scales'
import type { MatrixName } from './types'
import { VECTORSCOPE_EXTENT } from './vectorscope'
import { WAVEFORM_ROWS, waveformRow } from './waveform'

/** The waveform's graticule lines, in IRE (7.5 setup): every 20 IRE from −20 to 120, plus setup and white. */
export const WAVEFORM_GRATICULE_IRE = [-20, 0, 20, 40, 60, 80, 120] as const
/** Setup (7.5 IRE, black with setup) and white (100 IRE): drawn in the key colour. */
export const WAVEFORM_KEY_IRE = [7.5, 100] as const

export interface ScaleMark { ire: number, y: number, label: string, key: boolean }

/** `−` (U+2212) for negatives, as printed scales write it; one decimal only where the value has one. */
function scaleText(v: number, scale: LevelScale): string {
  const oneDecimal = (scale === 'ire' || scale === 'ire0' || scale === 'pct') && Math.abs(v * 10 - Math.round(v * 10)) < 1e-6 && !Number.isInteger(Math.round(v * 10) / 10)
  const r = oneDecimal ? Math.round(v * 10) / 10 : Math.round(v)
  const t = oneDecimal ? Math.abs(r).toFixed(1) : String(Math.abs(r))
  return r < 0 ? `−${t}` : t
}

/**
 * The graticule lines of a waveform image, top to bottom: `y` is the line's row centre as a
 * fraction of the image height (the same level-to-row mapping as the trace), `label` its
 * level in `scale` (7.5 IRE reads 0 % or 64 in 10-bit codes; 100 IRE reads 100 % or 940).
 */
export function waveformScaleMarks(scale: LevelScale): ScaleMark[] {
  const marks = [...WAVEFORM_GRATICULE_IRE.map((ire) => ({ ire, key: false })), ...WAVEFORM_KEY_IRE.map((ire) => ({ ire, key: true }))]
  return marks
    .map(({ ire, key }) => ({
      ire, key,
      y: (WAVEFORM_ROWS - 1 - waveformRow(ireToCode8(ire)) + 0.5) / WAVEFORM_ROWS,
      label: scaleText(toScale(ireToCode8(ire), scale), scale),
    }))
    .sort((a, b) => a.y - b.y)
}

const TARGET_LETTERS = { yellow: 'Yl', cyan: 'Cy', green: 'G', magenta: 'Mg', red: 'R', blue: 'B' } as const

/**
 * The skin-tone line's angle on the vectorscope: the I axis at 123° from +U, counter-clockwise
 * (common practice; the NTSC I axis lies 33° from +V — memory).
 */
export const SKIN_TONE_DEGREES = 123

/** A point on the vectorscope (U right, V up) as fractions of the image, for text and lines drawn over it. */
export function vectorscopePoint(u: number, v: number, extent = VECTORSCOPE_EXTENT): { x: number, y: number } {
  return { x: (u + extent) / (2 * extent), y: (extent - v) / (2 * extent) }
}

/**
 * Labels for the 75 % bar targets (set a little outside each target, away from the centre),
 * and the skin-tone line from the centre to the edge of the scope, as image fractions.
 */
export function vectorscopeMarks(matrix: MatrixName, extent = VECTORSCOPE_EXTENT) {
  const targets = barTargets(0.75, matrix).map((t) => {
    const len = Math.hypot(t.u, t.v)
    const at = vectorscopePoint(t.u + (t.u / len) * 0.085, t.v + (t.v / len) * 0.085, extent)
    return { name: t.name, letter: TARGET_LETTERS[t.name as keyof typeof TARGET_LETTERS] ?? t.name, ...at }
  })
  const a = (SKIN_TONE_DEGREES * Math.PI) / 180
  const reach = extent * 0.97
  const skinTone = { from: vectorscopePoint(0, 0, extent), to: vectorscopePoint(reach * Math.cos(a), reach * Math.sin(a), extent) }
  return { targets, skinTone }
}
