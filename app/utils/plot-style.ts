// Colours of the client-drawn plots, taken from the engine's palette so the line plot and the
// histograms read like the scope images the worker renders.
import { PALETTE } from '../../shared/engine/palette'

type Rgb = readonly [number, number, number]

export function rgbCss(c: Rgb, alpha = 1): string {
  return alpha === 1 ? `rgb(${c[0]}, ${c[1]}, ${c[2]})` : `rgba(${c[0]}, ${c[1]}, ${c[2]}, ${alpha})`
}

export const PLOT_COLOURS = {
  background: rgbCss(PALETTE.background),
  graticule: rgbCss(PALETTE.graticule),
  label: rgbCss(PALETTE.graticuleLabel),
  key: rgbCss(PALETTE.keyLine),
  luma: rgbCss(PALETTE.lumaTrace),
  envelope: rgbCss(PALETTE.flatTrace),
  envelopeFill: rgbCss(PALETTE.flatTrace, 0.28),
  red: rgbCss(PALETTE.red),
  green: rgbCss(PALETTE.green),
  blue: rgbCss(PALETTE.blue),
  cb: rgbCss(PALETTE.vectorTrace),
  cr: rgbCss(PALETTE.flatTrace),
  overlayHigh: rgbCss(PALETTE.overlayHigh),
  overlayLow: rgbCss(PALETTE.overlayLow),
} as const

export const PLOT_FONT = '"Roboto Mono", ui-monospace, monospace'
