// The colours of every image the engine draws, and of the app's charts beside them. A file of
// its own so the browser can take the palette without the renderers or the analysis.

export type Rgb = readonly [number, number, number]

/** Linewise's own palette (a dark grading-room look; not taken from any instrument). */
export const PALETTE = {
  background: [13, 16, 22] as Rgb,
  graticule: [54, 62, 76] as Rgb,
  graticuleLabel: [120, 132, 150] as Rgb,
  /** Setup (7.5 IRE) and white (100 IRE) lines, and the bar targets. */
  keyLine: [222, 158, 72] as Rgb,
  lumaTrace: [150, 232, 214] as Rgb,
  flatTrace: [236, 196, 128] as Rgb,
  red: [236, 84, 84] as Rgb,
  green: [96, 214, 120] as Rgb,
  blue: [100, 140, 250] as Rgb,
  vectorTrace: [196, 226, 255] as Rgb,
  /** Range overlay: levels above a limit, and below one. */
  overlayHigh: [255, 48, 150] as Rgb,
  overlayLow: [24, 170, 255] as Rgb,
  /** The vectorscope's skin-tone line. */
  skinTone: [214, 150, 118] as Rgb,
} as const
