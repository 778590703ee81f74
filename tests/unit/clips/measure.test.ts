// Whole clips through the probe, the streamed measurement and the events, on clips made by
// ffmpeg's generators (tests/unit/clips/make-clips.ts) with frames pushed out of range at
// positions chosen here. Timecode arithmetic: SMPTE ST 12-1 (memory) — frame 1800 at 29.97
// drop-frame is 00:01:00;02 (computed: labels ;00 and ;01 of minute 1 are skipped), as in
// tests/unit/timecode.test.ts. Level figures: BT.601 §2.5 / Table 3 coding (memory), 10-bit
// codes 1000 → 8-bit 250 (super-white, above 235) and 20 → 5 (below black 16).
import { execFileSync } from 'node:child_process'
import { writeFileSync, readFileSync, statSync } from 'node:fs'
import fc from 'fast-check'
import { afterAll, describe, expect, it } from 'vitest'
import { builtinSpec } from '../../../shared/engine/specs'
import { copyTimeline, decodeTimeline, emptyTimeline, encodeTimeline, findEvents, TIMELINE_COLUMNS, VERDICT_CODES } from '../../../shared/utils/clip-timeline'
import { planChunks } from '../../../shared/utils/clips'
import { framesToTimecode } from '../../../shared/utils/timecode'
import { clipTimecode } from '../../../workers/clips/keep-frame'
import { measureFrames } from '../../../workers/clips/measure'
import { ClipRefusal, parseProbe, probeClip, type FfprobeJson } from '../../../server/lib/clips/probe'
import { ffmpegRun, greyClipWithRuns, tempDir } from './make-clips'

const spec = builtinSpec('ntsc-setup')!
const tmp = tempDir()
afterAll(() => tmp.remove())

async function measureWhole(path: string) {
  const probe = await probeClip(path, statSync(path).size)
  const r = await measureFrames({ input: path, probe, start: 0, count: probe.frameCount, matrix: '709', rgbRange: 'full', spec, threads: 1 })
  return { probe, ...r }
}

const labelOf = (probe: { startTimecode: string, rate: { num: number, den: number }, dropFrame: boolean }, n: number) =>
  clipTimecode({ startTimecode: probe.startTimecode, fpsNum: probe.rate.num, fpsDen: probe.rate.den, dropFrame: probe.dropFrame }, n)

describe('a 25 fps clip with a run of super-white frames and a shorter run of crushed ones', () => {
  const path = tmp.path('runs25.mov')
  greyClipWithRuns(path, { rate: '25', frames: 100, runs: [{ from: 30, to: 39, code10: 1000 }, { from: 70, to: 74, code10: 20 }] })

  it('fails exactly those frames and finds one event per run with its timecodes', async () => {
    const { probe, timeline, measured, error } = await measureWhole(path)
    expect(error).toBeNull()
    expect(measured).toBe(100)
    const failing = [...timeline.verdict].flatMap((v, i) => (VERDICT_CODES[v] === 'fail' ? [i] : []))
    expect(failing).toEqual([...Array.from({ length: 10 }, (_, i) => 30 + i), ...Array.from({ length: 5 }, (_, i) => 70 + i)])
    expect([...timeline.verdict].filter((v) => v === 1)).toEqual([]) // no caution frames: grey is far from every limit
    const events = findEvents(timeline, spec)
    expect(events.map((e) => [e.start, e.end, e.verdict])).toEqual([[30, 39, 'fail'], [70, 74, 'fail']])
    // ST 12-1 non-drop at 25 fps (computed): frame 30 = 00:00:01:05, 39 = 01:14, 70 = 02:20, 74 = 02:24.
    expect(probe.startTimecode).toBe('00:00:00:00')
    expect(probe.startTimecodeFound).toBe(false)
    expect(events.map((e) => [labelOf(probe, e.start), labelOf(probe, e.end)])).toEqual([
      ['00:00:01:05', '00:00:01:14'], ['00:00:02:20', '00:00:02:24'],
    ])
    // Limits broken and worst values: 8-bit 250 is 7.5 + 92.5 × 234/219 = 106.34 IRE; 5 is 7.5 − 92.5 × 11/219 = 2.85 IRE (computed).
    expect(events[0]!.limits.map((l) => l.limit)).toEqual(['luma-max'])
    expect(events[0]!.limits[0]!.value).toBeCloseTo(106.34, 1)
    expect(events[1]!.limits.map((l) => l.limit)).toEqual(['luma-min'])
    expect(events[1]!.limits[0]!.value).toBeCloseTo(2.85, 1)
    expect(events[0]!.worstFrame).toBeGreaterThanOrEqual(30)
    expect(events[0]!.worstFrame).toBeLessThanOrEqual(39)
  })
})

describe('a 29.97 drop-frame clip with a run across the first minute', () => {
  const path = tmp.path('runs2997.mov')
  greyClipWithRuns(path, { rate: '30000/1001', frames: 1830, size: '32x18', runs: [{ from: 1795, to: 1805, code10: 1000 }], timecode: '00:00:00;00' })

  it('labels the event in drop-frame timecode (frame 1800 = 00:01:00;02)', async () => {
    const { probe, timeline } = await measureWhole(path)
    expect(probe.dropFrame).toBe(true)
    expect(probe.rate).toEqual({ num: 30000, den: 1001 })
    const events = findEvents(timeline, spec)
    expect(events.map((e) => [e.start, e.end])).toEqual([[1795, 1805]])
    // Computed from ST 12-1: 1795 = 00:00:59;25; 1800 = 00:01:00;02 (labels ;00 ;01 skipped), so 1805 = 00:01:00;07.
    expect(labelOf(probe, 1800)).toBe('00:01:00;02')
    expect([labelOf(probe, 1795), labelOf(probe, 1805)]).toEqual(['00:00:59;25', '00:01:00;07'])
  })
})

describe('start timecode from the container', () => {
  it('reads 01:00:00:00 from the MOV timecode track and offsets every label from it', async () => {
    const path = tmp.path('tc.mov')
    greyClipWithRuns(path, { rate: '25', frames: 40, runs: [{ from: 30, to: 31, code10: 1000 }], timecode: '01:00:00:00' })
    const { probe, timeline } = await measureWhole(path)
    expect(probe.startTimecode).toBe('01:00:00:00')
    expect(probe.startTimecodeFound).toBe(true)
    const [e] = findEvents(timeline, spec)
    expect([labelOf(probe, e!.start), labelOf(probe, e!.end)]).toEqual(['01:00:01:05', '01:00:01:06'])
  })
})

describe('per-frame luma against ffmpeg signalstats (ffmpeg 5.1.9-0+deb12u1)', () => {
  it('agrees on YMIN, YMAX and YAVG of every frame within ±1 8-bit code', async () => {
    const path = tmp.path('grain.mkv')
    // Camera-like content: a moving test pattern with temporal noise, 8-bit 4:2:0 (chroma brought to 4:2:2 for the engine; luma untouched).
    ffmpegRun(['-f', 'lavfi', '-i', 'testsrc2=s=160x90:r=25,noise=alls=20:allf=t', '-frames:v', '24', '-pix_fmt', 'yuv420p', '-c:v', 'ffv1', path])
    const { timeline, measured } = await measureWhole(path)
    expect(measured).toBe(24)
    const out = execFileSync('ffmpeg', ['-hide_banner', '-v', 'error', '-nostdin', '-threads', '1', '-i', path, '-vf', 'signalstats,metadata=print:file=-', '-f', 'null', '-']).toString('utf8')
    const per = (key: string) => [...out.matchAll(new RegExp(`lavfi\\.signalstats\\.${key}=([-\\d.]+)`, 'g'))].map((m) => Number(m[1]))
    const [ymin, ymax, yavg] = [per('YMIN'), per('YMAX'), per('YAVG')]
    expect(ymin.length).toBe(24)
    for (let i = 0; i < 24; i++) {
      expect(Math.abs(timeline.columns.lumaMin[i]! - ymin[i]!)).toBeLessThanOrEqual(1)
      expect(Math.abs(timeline.columns.lumaMax[i]! - ymax[i]!)).toBeLessThanOrEqual(1)
      expect(Math.abs(timeline.columns.lumaMean[i]! - yavg[i]!)).toBeLessThanOrEqual(1)
    }
  })
})

describe('chunked measurement equals one pass', () => {
  it('gives the same timeline and events for any chunk size, an event across a boundary included (property)', async () => {
    const path = tmp.path('chunks.mov')
    // The first run crosses many chunk boundaries; 10-bit 4:2:2 as a camera original would be.
    greyClipWithRuns(path, { rate: '25', frames: 90, runs: [{ from: 17, to: 44, code10: 1000 }, { from: 60, to: 61, code10: 20 }, { from: 64, to: 66, code10: 20 }] })
    const whole = await measureWhole(path)
    const oneEvents = findEvents(whole.timeline, spec)
    // Gap of two passing frames (62–63) is bridged (EVENT_BRIDGE_FRAMES = 3): two events, not three.
    expect(oneEvents.map((e) => [e.start, e.end])).toEqual([[17, 44], [60, 66]])
    await fc.assert(fc.asyncProperty(fc.integer({ min: 4, max: 45 }), async (size) => {
      const joined = emptyTimeline(90)
      for (const c of planChunks(90, size)) {
        const part = await measureFrames({ input: path, probe: whole.probe, start: c.start, count: c.count, matrix: '709', rgbRange: 'full', spec, threads: 1 })
        expect(part.measured).toBe(c.count)
        copyTimeline(joined, decodeTimeline(encodeTimeline(part.timeline)), c.start)
      }
      for (const col of TIMELINE_COLUMNS) expect(joined.columns[col]).toEqual(whole.timeline.columns[col])
      expect(joined.verdict).toEqual(whole.timeline.verdict)
      expect(findEvents(joined, spec)).toEqual(oneEvents)
    }), { numRuns: 5 })
  })
})

describe('measured on engine threads', () => {
  it('gives the same timeline as the calling thread, frame for frame, in any number of threads', async () => {
    const path = tmp.path('threads.mov')
    greyClipWithRuns(path, { rate: '25', frames: 60, size: '320x180', runs: [{ from: 7, to: 12, code10: 1000 }, { from: 40, to: 41, code10: 20 }] })
    const one = await measureWhole(path)
    for (const engineThreads of [2, 3]) {
      const r = await measureFrames({ input: path, probe: one.probe, start: 0, count: one.probe.frameCount, matrix: '709', rgbRange: 'full', spec, threads: 1, engineThreads })
      expect(r.measured).toBe(60)
      expect(r.error).toBeNull()
      for (const col of TIMELINE_COLUMNS) expect(r.timeline.columns[col], col).toEqual(one.timeline.columns[col])
      expect(r.timeline.verdict).toEqual(one.timeline.verdict)
      expect(r.timeline.failMask).toEqual(one.timeline.failMask)
    }
    expect(findEvents(one.timeline, spec).map((e) => [e.start, e.end])).toEqual([[7, 12], [40, 41]])
  })

  it('an engine thread that fails fails the chunk with its error, and leaves no ffmpeg running', async () => {
    const path = tmp.path('threads-broken.mov')
    greyClipWithRuns(path, { rate: '25', frames: 60, size: '320x180', runs: [] })
    const probe = await probeClip(path, statSync(path).size)
    // A limit on a quantity the engine does not know makes every frame throw inside the thread.
    const broken = { ...spec, limits: [{ ...spec.limits[0]!, quantity: 'nonsense' }] } as unknown as typeof spec
    await expect(measureFrames({ input: path, probe, start: 0, count: probe.frameCount, matrix: '709', rgbRange: 'full', spec: broken, threads: 1, engineThreads: 2 }))
      .rejects.toThrow()
    // ffmpeg is killed before the error comes back (measureFrames' finally).
    const ffmpegs = execFileSync('ps', ['-eo', 'args']).toString().split('\n').filter((l) => l.startsWith('ffmpeg ') && l.includes(path))
    expect(ffmpegs).toEqual([])
  })
})

describe('bad inputs are refused with their reason', () => {
  const refusal = async (path: string, bytes = statSync(path).size) => {
    try {
      await probeClip(path, bytes)
    } catch (e) {
      expect(e).toBeInstanceOf(ClipRefusal)
      return (e as Error).message
    }
    throw new Error('not refused')
  }

  it('audio only', async () => {
    const p = tmp.path('audio.m4a')
    ffmpegRun(['-f', 'lavfi', '-i', 'sine=f=1000:d=1', '-c:a', 'aac', p])
    expect(await refusal(p)).toMatch(/audio only/)
  })
  it('no video stream', async () => {
    const p = tmp.path('subs.mkv')
    writeFileSync(tmp.path('s.srt'), '1\n00:00:00,000 --> 00:00:01,000\nnothing to see\n')
    ffmpegRun(['-i', tmp.path('s.srt'), p])
    expect(await refusal(p)).toMatch(/no video stream/)
  })
  it('a still picture in a video container', async () => {
    const p = tmp.path('still.mov')
    ffmpegRun(['-f', 'lavfi', '-i', 'testsrc2=s=64x36', '-frames:v', '1', '-c:v', 'png', p])
    expect(await refusal(p)).toMatch(/still/)
  })
  it('a PNG sent as a clip', async () => {
    const p = tmp.path('still.png')
    ffmpegRun(['-f', 'lavfi', '-i', 'testsrc2=s=64x36', '-frames:v', '1', p])
    expect(await refusal(p)).toMatch(/still picture/)
  })
  it('zero duration', () => {
    // ffmpeg writes no track at all for zero frames, so the probe of a real clip is taken and
    // its lengths set to zero, as a header announcing an empty track reads.
    const p = tmp.path('runs25.mov')
    const j = JSON.parse(execFileSync('ffprobe', ['-v', 'error', '-print_format', 'json', '-show_format', '-show_streams', p]).toString('utf8')) as FfprobeJson
    for (const s of j.streams!) { s.nb_frames = '0'; s.duration = '0.000000' }
    j.format!.duration = '0.000000'
    expect(() => parseProbe(j, 1000)).toThrow(/zero duration/)
  })
  it('bytes ffmpeg cannot read', async () => {
    const p = tmp.path('noise.mov')
    writeFileSync(p, Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 251)))
    expect(await refusal(p)).toMatch(/cannot read this file as video/)
  })
  it('over the size cap', async () => {
    const p = tmp.path('runs25.mov')
    expect(await refusal(p, 201 * 2 ** 30)).toMatch(/larger than 200 GiB/)
  })

  it('a truncated file is measured up to where it breaks, and says so', async () => {
    const full = tmp.path('whole.mkv')
    greyClipWithRuns(full, { rate: '25', frames: 100, runs: [] })
    ffmpegRun(['-i', full, '-c:v', 'ffv1', tmp.path('whole-ffv1.mkv')])
    const bytes = readFileSync(tmp.path('whole-ffv1.mkv'))
    const cut = tmp.path('cut.mkv')
    writeFileSync(cut, bytes.subarray(0, Math.floor(bytes.length * 0.6)))
    const probe = await probeClip(cut, statSync(cut).size)
    expect(probe.frameCount).toBe(100) // the header still announces 4 s
    const r = await measureFrames({ input: cut, probe, start: 0, count: probe.frameCount, matrix: '709', rgbRange: 'full', spec, threads: 1 })
    expect(r.measured).toBeGreaterThan(30)
    expect(r.measured).toBeLessThan(100)
    expect(r.error).toBeTruthy()
    expect(r.timeline.frames).toBe(r.measured)
    // On engine threads it stops at the same frame, with every frame before it measured.
    const threaded = await measureFrames({ input: cut, probe, start: 0, count: probe.frameCount, matrix: '709', rgbRange: 'full', spec, threads: 1, engineThreads: 2 })
    expect(threaded.measured).toBe(r.measured)
    expect(threaded.timeline.columns.lumaMean).toEqual(r.timeline.columns.lumaMean)
  })
})

describe('timeline object', () => {
  it('round-trips and is 61 bytes a frame plus a 16-byte header', () => {
    const t = emptyTimeline(5)
    t.columns.lumaMax.set([1, 2, 3, 4, 5.5])
    t.verdict.set([0, 1, 2, 0, 2])
    t.failMask.set([0, 0, 4, 0, 1])
    const bytes = encodeTimeline(t)
    expect(bytes.byteLength).toBe(16 + 5 * 61)
    const back = decodeTimeline(bytes)
    expect(back.columns.lumaMax).toEqual(t.columns.lumaMax)
    expect(back.verdict).toEqual(t.verdict)
    expect(back.failMask).toEqual(t.failMask)
    expect(() => decodeTimeline(bytes.subarray(0, 40))).toThrow(/length/)
  })

  it('drop-frame labels agree with the timecode module', () => {
    expect(framesToTimecode(1800, { num: 30000, den: 1001 }, true)).toBe('00:01:00;02')
  })
})
