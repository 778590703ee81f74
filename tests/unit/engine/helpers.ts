import type { FrameInput } from '../../../shared/engine/index'

/** A uniform 16-bit full-range RGB frame from R'G'B' in 0..1. */
export function solidRgb16(r: number, g: number, b: number, width = 4, height = 2): FrameInput {
  const data = new Uint16Array(width * height * 3)
  for (let i = 0; i < width * height; i++) {
    data[i * 3] = Math.round(r * 65535); data[i * 3 + 1] = Math.round(g * 65535); data[i * 3 + 2] = Math.round(b * 65535)
  }
  return { kind: 'rgb', data, width, height, channels: 3, bitDepth: 16, range: 'full' }
}

export function solidRgb8(r: number, g: number, b: number, width = 4, height = 2, range: 'full' | 'studio' = 'full'): FrameInput {
  const data = new Uint8Array(width * height * 3)
  for (let i = 0; i < width * height; i++) {
    data[i * 3] = r; data[i * 3 + 1] = g; data[i * 3 + 2] = b
  }
  return { kind: 'rgb', data, width, height, channels: 3, bitDepth: 8, range }
}

/** UYVY from per-pixel-pair codes: [y0, y1, cb, cr] for every pair of a row, the same on every row. */
export function uyvyRow(pairs: Array<[number, number, number, number]>, height = 2): FrameInput {
  const width = pairs.length * 2
  const data = new Uint8Array(width * height * 2)
  for (let row = 0; row < height; row++) {
    pairs.forEach(([y0, y1, cb, cr], k) => {
      const o = row * width * 2 + k * 4
      data[o] = cb; data[o + 1] = y0; data[o + 2] = cr; data[o + 3] = y1
    })
  }
  return { kind: 'uyvy', data, width, height }
}
