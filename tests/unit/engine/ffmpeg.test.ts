// The engine against ffmpeg's signalstats filter on the same frames (Debian's ffmpeg 5.1):
// YMIN, YLOW (10th percentile), YAVG, YHIGH (90th), YMAX of luma, and BRNG (share of pixels
// with Y outside 16–235 or Cb/Cr outside 16–240), ±1 code. Frames come from ffmpeg's own
// generators. Checked with ffmpeg 5.1.9-0+deb12u1 (Debian 12).
import { describe, expect, it } from 'vitest'
import { analyseFrame } from '../../../shared/engine/index'
import type { FrameAnalysis, FrameInput } from '../../../shared/engine/index'
import { ffmpegVersion, generate, signalstats } from './ffmpeg'
import type { SignalStats } from './ffmpeg'

function planar422(raw: Buffer, width: number, height: number, bitDepth: 8 | 10): FrameInput {
  const cw = width / 2
  if (bitDepth === 8) {
    const u8 = new Uint8Array(raw.buffer, raw.byteOffset, raw.length)
    return { kind: 'planar', width, height, bitDepth, subsampling: '422', y: u8.subarray(0, width * height), cb: u8.subarray(width * height, width * height + cw * height), cr: u8.subarray(width * height + cw * height) }
  }
  const u16 = new Uint16Array(raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.length))
  return { kind: 'planar', width, height, bitDepth, subsampling: '422', y: u16.subarray(0, width * height), cb: u16.subarray(width * height, width * height + cw * height), cr: u16.subarray(width * height + cw * height) }
}

function compare(a: FrameAnalysis, s: SignalStats, codeScale: number): void {
  const k = codeScale
  expect(Math.abs(a.luma.min * k - s.YMIN!)).toBeLessThanOrEqual(1)
  expect(Math.abs(a.luma.p10 * k - s.YLOW!)).toBeLessThanOrEqual(1)
  expect(Math.abs(a.luma.mean * k - s.YAVG!)).toBeLessThanOrEqual(1)
  expect(Math.abs(a.luma.p90 * k - s.YHIGH!)).toBeLessThanOrEqual(1)
  expect(Math.abs(a.luma.max * k - s.YMAX!)).toBeLessThanOrEqual(1)
  // BRNG is printed with six significant digits.
  expect(Math.abs(a.shares.studioOut - s.BRNG!)).toBeLessThanOrEqual(1e-5)
}

const SOURCES: Array<[string, string, number, number]> = [
  ['SD colour bars with PLUGE (smptebars)', 'smptebars=s=720x486', 720, 486],
  ['HD colour bars (smptehdbars)', 'smptehdbars=s=640x360', 640, 360],
  ['test pattern (testsrc2)', 'testsrc2=s=320x240', 320, 240],
  ['gradients', 'gradients=s=320x240:seed=7:type=radial', 320, 240],
  ['fractal (mandelbrot)', 'mandelbrot=s=256x192', 256, 192],
  ['noise on grey, codes beyond studio range', 'color=c=gray:s=256x128,format=yuv422p,noise=alls=80:allf=t', 256, 128],
  ['noise on a hot red, super-white and illegal chroma', 'color=c=0xff2020:s=256x128,format=yuv422p,noise=alls=60:allf=t', 256, 128],
]

describe(`engine vs ffmpeg signalstats (${ffmpegVersion()})`, () => {
  for (const [label, source, w, h] of SOURCES) {
    it(`8-bit 4:2:2 planar: ${label}`, () => {
      const raw = generate(source, 'yuv422p')
      compare(analyseFrame(planar422(raw, w, h, 8)), signalstats(raw, 'yuv422p', w, h), 1)
    })
  }

  it('8-bit UYVY of the same frames reads like the planar copy', () => {
    for (const [, source, w, h] of SOURCES.slice(0, 3)) {
      const raw = generate(source, 'uyvy422')
      const s = signalstats(raw, 'uyvy422', w, h)
      compare(analyseFrame({ kind: 'uyvy', data: new Uint8Array(raw.buffer, raw.byteOffset, raw.length), width: w, height: h }), s, 1)
    }
  })

  const TEN_BIT: Array<[string, string, number, number]> = [
    ['HD colour bars (smptehdbars)', 'smptehdbars=s=640x360', 640, 360],
    ['test pattern (testsrc2)', 'testsrc2=s=320x240', 320, 240],
    ['ramps through sub-black and super-white', 'color=c=gray:s=320x64,format=yuv422p10le,geq=lum=\'X*1023/W\':cb=\'Y*1023/H\':cr=\'1023-Y*1023/H\'', 320, 64],
  ]
  for (const [label, source, w, h] of TEN_BIT) {
    it(`10-bit 4:2:2 planar and v210: ${label}`, () => {
      const raw = generate(source, 'yuv422p10le')
      const s = signalstats(raw, 'yuv422p10le', w, h)
      const planar = analyseFrame(planar422(raw, w, h, 10))
      compare(planar, s, 4)
      // ffmpeg's v210 encoder packs the same frame (clipping to 4–1019, the codes v210 may
      // carry); our unpacking is checked against ffmpeg's own v210 decoder on those bytes.
      const v210 = generate(source, 'v210')
      const packed = analyseFrame({ kind: 'v210', data: new Uint8Array(v210.buffer, v210.byteOffset, v210.length), width: w, height: h })
      compare(packed, signalstats(v210, 'v210', w, h), 4)
    })
  }

  // R'G'B' frames: the engine converts them itself; ffmpeg's swscale converts the same frame
  // with out_color_matrix=bt601:out_range=tv to 4:4:4 (ffmpeg 5.1 scale filter) before signalstats.
  const RGB: Array<[string, string, number, number]> = [
    ['RGB test pattern (rgbtestsrc)', 'rgbtestsrc=s=320x240', 320, 240],
    ['test pattern (testsrc2) as RGB', 'testsrc2=s=320x240', 320, 240],
    ['gradients as RGB', 'gradients=s=320x240:seed=11', 320, 240],
  ]
  for (const [label, source, w, h] of RGB) {
    it(`8-bit full-range R'G'B': ${label}`, () => {
      const raw = generate(source, 'rgb24')
      const s = signalstats(raw, 'rgb24', w, h, 'scale=in_range=pc:out_range=tv:out_color_matrix=bt601:flags=accurate_rnd+full_chroma_int,format=yuv444p,')
      const a = analyseFrame({ kind: 'rgb', data: new Uint8Array(raw.buffer, raw.byteOffset, raw.length), width: w, height: h, channels: 3, bitDepth: 8, range: 'full' })
      compare(a, s, 1)
    })
  }
})
