// Bars check: recognition and line-up figures against the published bar tables.
// Sources beside each check:
// - SMPTE EG 1 75 % bars with setup (luma IRE / chroma p-p IRE / phase), computed from the
//   BT.601 equations and the SMPTE 170M composite weighting (memory for the clause numbers):
//   grey 76.9 / 0; yellow 69.0 / 62.1 / 167.1°; cyan 56.1 / 87.7 / 283.5°; green 48.2 / 81.9 / 240.7°;
//   magenta 36.2 / 81.9 / 60.7°; red 28.2 / 87.7 / 103.5°; blue 15.4 / 62.1 / 347.1°; black 7.5.
// - ITU-R BT.801-1 Table 1 codes (8- and 10-bit) in tests/support/bars.ts.
// - SMPTE RP 219 / ITU-R BT.2111 Table 2 8-bit codes (computed from the BT.709 equations).
import { describe, expect, it } from 'vitest'
import { barsTolerancesFor, builtinSpec, code8ToIre, measureBars } from '../../../shared/engine/index'
import type { BarName, BarsResult, FrameInput } from '../../../shared/engine/index'
import {
  applyErrors, BT801_100, BT801_75, exactColour, fullFieldPatches, rgb8Frame, rp219Patches, RP219_75_8, splitFieldPatches, uyvyFrame, v210Frame,
} from '../../support/bars'
import type { Codes, LineupErrors, Patch, Ypp } from '../../support/bars'
import { ffmpegVersion, generate } from './ffmpeg'

// SMPTE EG 1 75 % bars with 7.5 IRE setup (computed; see the header).
const EG1: Record<string, { luma: number, pp: number, phase: number | null }> = {
  grey: { luma: 76.9, pp: 0, phase: null },
  yellow: { luma: 69.0, pp: 62.1, phase: 167.1 },
  cyan: { luma: 56.1, pp: 87.7, phase: 283.5 },
  green: { luma: 48.2, pp: 81.9, phase: 240.7 },
  magenta: { luma: 36.2, pp: 81.9, phase: 60.7 },
  red: { luma: 28.2, pp: 87.7, phase: 103.5 },
  blue: { luma: 15.4, pp: 62.1, phase: 347.1 },
  black: { luma: 7.5, pp: 0, phase: null },
}

const angle = (a: number, b: number) => Math.abs(((a - b + 540) % 360) - 180)
const noExtra = (y: Ypp) => y

function codes(depth: 0 | 1) {
  return (n: BarName | 'grey'): Codes => BT801_75[n][depth]
}

function expectEg1(r: BarsResult) {
  expect(r.recognised).toBe(true)
  for (const b of r.bars) {
    const t = EG1[b.name]!
    // EG 1 luma within 0.3 IRE, chroma p-p within 0.6 IRE, phase within 0.6° (issue tolerances;
    // the table is rounded to 0.1 and codes to one step).
    expect(Math.abs(b.lumaIre - t.luma), `${b.name} luma`).toBeLessThan(0.3)
    expect(Math.abs(b.chromaPpIre - t.pp), `${b.name} chroma`).toBeLessThan(0.6)
    if (t.phase !== null) expect(angle(b.phaseDeg!, t.phase), `${b.name} phase`).toBeLessThan(0.6)
  }
}

describe('bars built from the published codes are recognised and read as the tables', () => {
  it('BT.801 8-bit split field as UYVY: SMPTE EG 1 figures and the split-field pattern', () => {
    const r = measureBars(uyvyFrame(splitFieldPatches(codes(0), noExtra), 720, 486))
    expect(r.pattern).toBe('sd-75-split')
    expect(r.amplitude).toBe(75)
    expect(r.bars.map(b => b.name)).toEqual(['grey', 'yellow', 'cyan', 'green', 'magenta', 'red', 'blue', 'black'])
    expectEg1(r)
    // Black at code 16 (BT.601 Table 3): no pedestal in the codes, read on the setup scale.
    expect(r.setup).toBe('absent')
    expect(r.scale).toBe('ire')
    expect(r.verdict).toBe('pass')
    // Every sample is a region of the bar's central half, not a pixel (720/7 = 102.9 samples a bar).
    for (const b of r.bars.slice(0, 7)) expect(b.region.x1 - b.region.x0).toBeGreaterThan(45)
    // PLUGE at 3.5 / 7.5 / 11.5 IRE (EG 1 practice, memory): steps of −4 and +4 IRE about black, ±0.3 for 8-bit codes.
    expect(r.pluge!.map(p => Math.round(p.relativeIre))).toEqual([-4, 0, 4])
  })

  it('BT.801 10-bit split field as v210 reads the same', () => {
    const r = measureBars(v210Frame(splitFieldPatches(codes(1), noExtra), 720, 486))
    expect(r.pattern).toBe('sd-75-split')
    expectEg1(r)
  })

  it('BT.801 8-bit full field (100/0/75/0, with black) as UYVY and 75 % bars as an 8-bit R\'G\'B\' still', () => {
    const withWhite = measureBars(uyvyFrame(fullFieldPatches(codes(0), { first: 'white', withBlack: true }), 720, 486))
    expect(withWhite.pattern).toBe('sd-75-full')
    expect(withWhite.bars[0]!.name).toBe('white')
    // White at 100 IRE (SMPTE 170M, memory); the rest as EG 1.
    expect(Math.abs(withWhite.bars[0]!.lumaIre - 100)).toBeLessThan(0.3)
    for (const b of withWhite.bars.slice(1)) expect(Math.abs(b.lumaIre - EG1[b.name]!.luma)).toBeLessThan(0.3)
    const rgb = measureBars(rgb8Frame(fullFieldPatches(exactColour(0.75, '601')) as Array<Patch & { fill: Ypp }>, 720, 486))
    expect(rgb.pattern).toBe('sd-75-full')
    expectEg1(rgb)
  })

  it('100 % bars (BT.801 100/0/100/0 codes) are recognised as 100 % full field', () => {
    const c = (n: BarName | 'grey'): Codes => n === 'grey' || n === 'white' ? BT801_75.white[0] : n === 'black' ? BT801_75.black[0] : BT801_100[n][0]
    const r = measureBars(uyvyFrame(fullFieldPatches(c), 720, 486))
    expect(r.pattern).toBe('sd-100-full')
    expect(r.amplitude).toBe(100)
    // 100 % bars, values computed from the ITU-R BT.601 equations in the manner of SMPTE EG 1 — memory: yellow 89.5 IRE / 82.8 p-p, cyan 72.3 / 117.0.
    const y = r.bars.find(b => b.name === 'yellow')!
    expect(Math.abs(y.lumaIre - (7.5 + 92.5 * 0.886))).toBeLessThan(0.3)
    expect(Math.abs(y.chromaPpIre - 82.8)).toBeLessThan(0.6)
    expect(Math.abs(r.bars.find(b => b.name === 'cyan')!.chromaPpIre - 117.0)).toBeLessThan(0.6)
  })

  it('RP 219 HD bars from their 8-bit codes, UYVY and v210, read as the BT.709 table', () => {
    const c8 = (n: BarName | 'grey'): Codes => n === 'grey' ? [180, 128, 128] : n === 'white' ? [235, 128, 128] : n === 'black' ? [16, 128, 128] : RP219_75_8[n]
    const extra = (y: Ypp) => y
    const u = measureBars(uyvyFrame(rp219Patches(c8, extra), 1920, 1080), { matrix: '709' })
    expect(u.pattern).toBe('hd-rp219')
    // Table luma from the BT.709 equations: 75 % yellow Y' = 0.75·(0.2126 + 0.7152) = 0.69585 → 7.5 + 92.5·0.69585 = 71.87 IRE.
    const yl = u.bars.find(b => b.name === 'yellow')!
    expect(yl.expectedIre).toBeCloseTo(71.87, 2)
    for (const b of u.bars) {
      expect(Math.abs(b.lumaErrorIre), b.name).toBeLessThan(0.3)
      expect(Math.abs(b.chromaErrorIre), b.name).toBeLessThan(0.6)
      if (b.phaseErrorDeg !== null) expect(Math.abs(b.phaseErrorDeg), b.name).toBeLessThan(0.6)
    }
    // PLUGE −2 %, 0, +2 %, 0, +4 % of the 92.5 IRE span (RP 219, memory): −1.85, 0, +1.85, 0, +3.7 IRE.
    expect(u.pluge!.map(p => p.relativeIre)).toEqual([-1.85, 0, 1.85, 0, 3.7].map(v => expect.closeTo(v, 0)))
    const v = measureBars(v210Frame(rp219Patches(exactColour(0.75, '709'), extra), 1920, 1080), { matrix: '709' })
    expect(v.pattern).toBe('hd-rp219')
    for (const b of v.bars) expect(Math.abs(b.lumaErrorIre), b.name).toBeLessThan(0.3)
  })

  it('RP 219 bars on a reel set to BT.601 are measured with BT.709 and say so', () => {
    const r = measureBars(v210Frame(rp219Patches(exactColour(0.75, '709'), y => y), 1920, 1080), { matrix: '601' })
    expect(r.matrix).toBe('709')
    expect(r.notes.join(' ')).toMatch(/BT\.709/)
    expect(Math.abs(r.hueErrorDeg!)).toBeLessThan(0.3)
  })
})

describe('line-up errors applied in code are measured (10-bit v210 split field)', () => {
  const measure = (e: LineupErrors) => measureBars(v210Frame(splitFieldPatches(exactColour(0.75, '601', e), y => applyErrors(y, e, '601')), 720, 486))

  it('no error: gains 100 %, hue 0°, black 7.5 IRE', () => {
    const r = measure({})
    expect(Math.abs(r.lumaGainErrorPct!)).toBeLessThan(0.2)
    expect(Math.abs(r.chromaGainErrorPct!)).toBeLessThan(0.2)
    expect(Math.abs(r.hueErrorDeg!)).toBeLessThan(0.3)
    expect(Math.abs(r.blackOffsetIre!)).toBeLessThan(0.2)
  })

  it('luma gain 95 % → −5.0 % within 0.2 %, and a fail on the luma of the bright bars', () => {
    const r = measure({ lumaGain: 0.95 })
    expect(Math.abs(r.lumaGainPct! - 95)).toBeLessThan(0.2)
    expect(Math.abs(r.chromaGainErrorPct!)).toBeLessThan(0.2)
    expect(r.verdict).toBe('fail')
    // 75 % grey: 7.5 + 92.5·0.75·0.95 = 73.41 IRE, 3.47 IRE low (computed).
    expect(r.reasons.find(x => x.check === 'luma-grey')!.value).toBeCloseTo(-3.47, 1)
  })

  it('chroma gain 110 % → +10 % within 0.2 %', () => {
    const r = measure({ chromaGain: 1.1 })
    expect(Math.abs(r.chromaGainPct! - 110)).toBeLessThan(0.2)
    expect(Math.abs(r.lumaGainErrorPct!)).toBeLessThan(0.2)
    expect(r.reasons.map(x => x.check)).toEqual(['chroma-gain'])
    // Each bar's chroma reads 110 % of the table (e.g. yellow 62.07 → 68.28 IRE p-p, computed).
    for (const b of r.bars.filter(x => x.chromaPct !== null)) expect(Math.abs(b.chromaPct! - 110)).toBeLessThan(0.5)
  })

  it.each([5, -7])('hue rotated %d° in the composite U/V plane → measured within 0.3°', (deg) => {
    const r = measure({ hueDeg: deg })
    expect(Math.abs(r.hueErrorDeg! - deg)).toBeLessThan(0.3)
    for (const b of r.bars.filter(x => x.phaseErrorDeg !== null)) expect(Math.abs(b.phaseErrorDeg! - deg)).toBeLessThan(0.5)
    expect(Math.abs(r.chromaGainErrorPct!)).toBeLessThan(0.2)
    expect(r.verdict).toBe('fail')
    expect(r.reasons.map(x => x.check)).toEqual(['hue'])
  })

  it('black offset +3 IRE → +3.0 within 0.2 IRE, setup unchanged', () => {
    const r = measure({ blackOffsetIre: 3 })
    expect(Math.abs(r.blackOffsetIre! - 3)).toBeLessThan(0.2)
    expect(Math.abs(r.lumaGainErrorPct!)).toBeLessThan(0.2)
    expect(r.setup).toBe('absent')
    expect(r.reasons[0]!.check).toBe('black')
  })

  it('setup carried in the codes (black at code 32.4) reads setup present; removed, it reads absent', () => {
    // Pedestal in the codes: Y' → 0.075 + 0.925·Y' (SMPTE 170M setup of 7.5 IRE, memory), so on the
    // no-setup scale every bar reads as EG 1 itself.
    const withSetup = measure({ setupInCodes: true })
    expect(withSetup.setup).toBe('present')
    expect(withSetup.scale).toBe('ire0')
    expect(Math.abs(withSetup.blackCode8! - (16 + 0.075 * 219))).toBeLessThan(0.3)
    expect(Math.abs(withSetup.blackOffsetIre!)).toBeLessThan(0.2)
    expect(Math.abs(withSetup.lumaGainErrorPct!)).toBeLessThan(0.2)
    expect(Math.abs(withSetup.chromaGainErrorPct!)).toBeLessThan(0.2)
    for (const b of withSetup.bars) expect(Math.abs(b.lumaIre - EG1[b.name]!.luma), b.name).toBeLessThan(0.3)
    // Digital deliveries expect black at code 16 (BT.601 Table 3): the pedestal is a finding.
    expect(withSetup.verdict).toBe('fail')
    expect(withSetup.reasons.map(x => x.check)).toEqual(['setup'])
    const removed = measure({})
    expect(removed.setup).toBe('absent')
    expect(removed.scale).toBe('ire')
    expect(Math.abs(removed.blackIre! - 7.5)).toBeLessThan(0.2)
    expect(removed.verdict).toBe('pass')
  })

  it('tolerances: common practice unless the spec holds its own', () => {
    expect(barsTolerancesFor(builtinSpec('digital-studio'))).toMatchObject({ lumaIre: 1, chromaGainPct: 3, hueDeg: 2, setup: 'absent' })
    const own = { ...builtinSpec('digital-studio')!, barsTolerances: { lumaIre: 2, chromaGainPct: 12, hueDeg: 9, setup: 'either' as const, matchLevelIre: 1, matchGainPct: 1, matchChromaPct: 1, matchHueDeg: 1 } }
    expect(measureBars(v210Frame(splitFieldPatches(exactColour(0.75, '601', { hueDeg: 5, chromaGain: 1.1 }), noExtra), 720, 486), { spec: own }).verdict).toBe('pass')
  })
})

describe(`ffmpeg's bars generators are recognised (${ffmpegVersion()})`, () => {
  const frame = (source: string, w: number, h: number): FrameInput => ({ kind: 'uyvy', data: new Uint8Array(generate(`${source}=size=${w}x${h}`, 'uyvy422')), width: w, height: h })

  it('smptebars at 720×486 is the split field, EG 1 figures', () => {
    const r = measureBars(frame('smptebars', 720, 486))
    expect(r.pattern).toBe('sd-75-split')
    for (const b of r.bars.slice(0, 7)) {
      expect(Math.abs(b.lumaIre - EG1[b.name]!.luma), b.name).toBeLessThan(0.3)
      expect(Math.abs(b.chromaPpIre - EG1[b.name]!.pp), b.name).toBeLessThan(0.6)
    }
    // ffmpeg's PLUGE: codes 7, 16, 24 (read from its output) = −3.8 and +3.4 IRE about black.
    expect(r.pluge!.map(p => code8ToIre(16) + p.relativeIre)).toEqual([expect.closeTo(code8ToIre(7), 2), expect.closeTo(code8ToIre(16), 2), expect.closeTo(code8ToIre(24), 2)])
  })

  it('smptebars at 640×480 and smptehdbars at 1920×1080 and 1280×720', () => {
    expect(measureBars(frame('smptebars', 640, 480)).pattern).toBe('sd-75-split')
    for (const [w, h] of [[1920, 1080], [1280, 720]] as const) {
      const r = measureBars(frame('smptehdbars', w, h), { matrix: '709' })
      expect(r.pattern).toBe('hd-rp219')
      expect(Math.abs(r.hueErrorDeg!)).toBeLessThan(0.6)
      expect(r.verdict).toBe('pass')
    }
  })

  it('ffmpeg\'s other test patterns are not bars', () => {
    for (const src of ['testsrc2', 'rgbtestsrc', 'mandelbrot', 'yuvtestsrc']) {
      const r = measureBars(frame(src, 720, 486))
      expect(r.recognised, src).toBe(false)
      expect(r.verdict).toBeNull()
      expect(r.notes.length).toBeGreaterThan(0)
    }
  })
})

describe('frames that are not bars are not judged as bars', () => {
  it('a photograph-like frame (smooth gradients and grain) is refused with a reason', () => {
    const w = 720; const h = 486
    const data = new Uint8Array(w * h * 3)
    let s = 7
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        s = (s * 1103515245 + 12345) & 0x7fffffff
        const n = (s >> 16) % 9 - 4
        const o = (y * w + x) * 3
        data[o] = Math.max(0, Math.min(255, 90 + 80 * Math.sin(x / 60) + n))
        data[o + 1] = Math.max(0, Math.min(255, 110 + 60 * Math.cos(y / 45) + n))
        data[o + 2] = Math.max(0, Math.min(255, 70 + 50 * Math.sin((x + y) / 90) + n))
      }
    }
    const r = measureBars({ kind: 'rgb', data, width: w, height: h, channels: 3, bitDepth: 8, range: 'full' })
    expect(r.recognised).toBe(false)
    expect(r.notes[0]).toMatch(/colour-bar order/)
  })

  it('bar colours in unequal widths (wrong proportions) are refused', () => {
    const widths = [0.1, 0.2, 0.1, 0.2, 0.1, 0.2, 0.1]
    let x = 0
    const order: Array<BarName | 'grey'> = ['grey', 'yellow', 'cyan', 'green', 'magenta', 'red', 'blue']
    const patches: Patch[] = order.map((n, k) => { const p = { x0: x, x1: x + widths[k]!, y0: 0, y1: 1, fill: BT801_75[n][0] }; x += widths[k]!; return p })
    const r = measureBars(uyvyFrame(patches, 720, 486))
    expect(r.recognised).toBe(false)
    expect(r.notes.join(' ')).toMatch(/equal width/)
  })

  it('bars over half the width, or ending half-way down, are refused', () => {
    const half = fullFieldPatches(codes(0)).map(p => ({ ...p, x0: p.x0 / 2, x1: p.x1 / 2 }))
    half.push({ x0: 0.5, x1: 1, y0: 0, y1: 1, fill: [16, 128, 128] })
    expect(measureBars(uyvyFrame(half, 720, 486)).notes.join(' ')).toMatch(/span 50 % of the width/)
    const short = fullFieldPatches(codes(0)).map(p => ({ ...p, y1: 0.5 }))
    short.push({ x0: 0, x1: 1, y0: 0.5, y1: 1, fill: [16, 128, 128] })
    const r = measureBars(uyvyFrame(short, 720, 486))
    expect(r.recognised).toBe(false)
    expect(r.notes.join(' ')).toMatch(/end 50 % of the way down/)
  })
})
