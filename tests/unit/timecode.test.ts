// SMPTE ST 12-1 time addresses. Sources: the non-drop formula frame = ((h·60 + m)·60 + s)·fps + f
// and the drop-frame rule (labels 00 and 01 skipped at the start of each minute except every
// tenth; 59.94 skips 00–03) are ST 12-1 — memory. The drop-frame examples (frame 1800 is
// 00:01:00;02, 17 982 is 00:10:00;00, 107 892 is 01:00:00;00) are computed from that rule:
// ten minutes hold 18 000 − 9 × 2 = 17 982 labels.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  FRAME_RATES, canDropFrame, framesToTimecode, nameFrameRate, offsetTimecode, parseTimecode,
  timecodeFromFileName, timecodeToFrames,
} from '../../shared/utils/timecode'

const r25 = FRAME_RATES['25']
const r2997 = FRAME_RATES['29.97']
const r5994 = FRAME_RATES['59.94']

describe('non-drop labels (ST 12-1 — memory; computed)', () => {
  it('counts whole frames at 25 fps', () => {
    expect(framesToTimecode(0, r25)).toBe('00:00:00:00')
    expect(framesToTimecode(30, r25)).toBe('00:00:01:05')
    expect(framesToTimecode(64, r25)).toBe('00:00:02:14')
    expect(framesToTimecode(90_000, r25)).toBe('01:00:00:00')
    expect(timecodeToFrames('00:00:02:14', r25)).toBe(64)
  })

  it('labels 29.97 without drop-frame at 30 frames a labelled second', () => {
    expect(framesToTimecode(1800, r2997, false)).toBe('00:01:00:00')
  })

  it('adds a start label (a clip starting at 01:00:00:00)', () => {
    expect(offsetTimecode('01:00:00:00', 30, r25)).toBe('01:00:01:05')
  })
})

describe('drop-frame labels at 29.97 (ST 12-1 — memory; computed)', () => {
  it('skips ;00 and ;01 at the start of minutes not divisible by ten', () => {
    expect(framesToTimecode(1799, r2997, true)).toBe('00:00:59;29')
    expect(framesToTimecode(1800, r2997, true)).toBe('00:01:00;02')
    expect(framesToTimecode(17_981, r2997, true)).toBe('00:09:59;29')
    expect(framesToTimecode(17_982, r2997, true)).toBe('00:10:00;00')
    expect(framesToTimecode(107_892, r2997, true)).toBe('01:00:00;00')
  })

  it('reads labels back, and refuses the labels that are skipped', () => {
    expect(timecodeToFrames('00:01:00;02', r2997)).toBe(1800)
    expect(timecodeToFrames('00:10:00;00', r2997)).toBe(17_982)
    expect(timecodeToFrames('01:00:00;00', r2997)).toBe(107_892)
    expect(() => timecodeToFrames('00:01:00;00', r2997)).toThrow(/skipped/)
    expect(() => timecodeToFrames('00:00:00:30', r2997)).toThrow(/does not exist/)
  })

  it('skips four labels a minute at 59.94', () => {
    expect(framesToTimecode(3600, r5994, true)).toBe('00:01:00;04')
    expect(timecodeToFrames('00:10:00;00', r5994)).toBe(35_964) // 36 000 − 9 × 4
  })

  it('only 29.97 and 59.94 can drop frames', () => {
    expect(canDropFrame(r2997)).toBe(true)
    expect(canDropFrame(r5994)).toBe(true)
    expect(canDropFrame(r25)).toBe(false)
    expect(canDropFrame(FRAME_RATES['23.976'])).toBe(false)
    expect(framesToTimecode(1800, r25, true)).toBe('00:01:12:00')
  })

  it('round-trips every frame of a day (property)', () => {
    for (const [rate, drop] of [[r2997, true], [r5994, true], [r25, false], [FRAME_RATES['23.976'], false]] as const) {
      fc.assert(fc.property(fc.integer({ min: 0, max: 2_000_000 }), (n) => {
        expect(timecodeToFrames(framesToTimecode(n, rate, drop), rate, drop)).toBe(n)
      }))
    }
  })
})

describe('labels in text', () => {
  it('parses and refuses', () => {
    expect(parseTimecode('01:02:03;04')).toEqual({ h: 1, m: 2, s: 3, f: 4, dropFrame: true })
    expect(parseTimecode('25:00:00:00')).toBeNull()
    expect(parseTimecode('1:2:3:4')).toBeNull()
  })

  it('finds a timecode in an exported grab\'s file name', () => {
    expect(timecodeFromFileName('A003_01-00-12-05.png')).toMatchObject({ h: 1, m: 0, s: 12, f: 5, dropFrame: false })
    expect(timecodeFromFileName('shot 01_00_12_05.tif')).toMatchObject({ h: 1, s: 12, f: 5 })
    expect(timecodeFromFileName('clip_00-10-00;00.png')).toMatchObject({ m: 10, dropFrame: true })
    expect(timecodeFromFileName('frame_0042.png')).toBeNull()
    expect(timecodeFromFileName('20261202_123456.png')).toBeNull()
  })

  it('names measured rates', () => {
    expect(nameFrameRate({ num: 30000, den: 1001 })).toBe('29.97')
    expect(nameFrameRate({ num: 2997, den: 100 })).toBe('29.97')
    expect(nameFrameRate({ num: 25, den: 1 })).toBe('25')
    expect(nameFrameRate({ num: 12, den: 1 })).toBeNull()
  })
})
