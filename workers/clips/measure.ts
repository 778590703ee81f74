// Measures a run of a clip's frames as ffmpeg decodes them: raw planar Y'CbCr at the
// source's depth (R'G'B' sources as R'G'B') arrives on a pipe, frame buffers are reused,
// and each frame goes through the engine (statistics, shares, level distributions; no
// densities) into a timeline row, on this thread or on engine threads. Memory stays a few
// frames plus the pipe's buffer, whatever the clip's length; nothing is written to local disk.
import { spawn } from 'node:child_process'
import { availableParallelism } from 'node:os'
import { Worker } from 'node:worker_threads'
import { analyseFrame } from '../../shared/engine/analyse'
import type { DeliverySpec } from '../../shared/engine/specs'
import type { FrameInput, MatrixName, SourceRange } from '../../shared/engine/types'
import { copyTimeline, emptyTimeline, recordFrame, sliceTimeline, type Timeline } from '../../shared/utils/clip-timeline'
import type { ClipProbe } from '../../server/lib/clips/probe'

const FFMPEG = process.env.FFMPEG ?? 'ffmpeg'

export interface DecodePlan {
  pixFmt: string
  frameBytes: number
  filters: string[]
  make: (buf: Uint8Array) => FrameInput
}

/** How a clip is piped to the engine: the pixel format asked of ffmpeg and the view of each frame. */
export type PlanSource = Pick<ClipProbe, 'width' | 'height' | 'chroma' | 'bitDepth' | 'rangeTag'>

export function decodePlan(p: PlanSource, rgbRange: SourceRange): DecodePlan {
  const { width: w, height: h } = p
  if (p.chroma === 'rgb') {
    const deep = p.bitDepth > 8
    const frameBytes = w * h * 3 * (deep ? 2 : 1)
    return {
      pixFmt: deep ? 'rgb48le' : 'rgb24', frameBytes, filters: [],
      make: (buf) => ({
        kind: 'rgb', width: w, height: h, channels: 3, bitDepth: deep ? 16 : 8, range: p.rangeTag ?? rgbRange,
        data: deep ? new Uint16Array(buf.buffer, buf.byteOffset, frameBytes / 2) : buf.subarray(0, frameBytes),
      }),
    }
  }
  const deep = p.bitDepth > 8
  const s444 = p.chroma === '444'
  const cw = s444 ? w : Math.ceil(w / 2)
  const bps = deep ? 2 : 1
  const ySize = w * h
  const cSize = cw * h
  // Y'CbCr stays Y'CbCr: 4:2:0 chroma is brought to 4:2:2 (luma untouched); full-range
  // Y'CbCr is put on the studio scale the engine reads (its levels are kept, not clipped).
  const filters = p.rangeTag === 'full' ? ['scale=in_range=pc:out_range=tv'] : []
  return {
    pixFmt: `${s444 ? 'yuv444p' : 'yuv422p'}${deep ? '10le' : ''}`,
    frameBytes: (ySize + 2 * cSize) * bps, filters,
    make: (buf) => {
      const plane = (at: number, n: number) => deep
        ? new Uint16Array(buf.buffer, buf.byteOffset + at * 2, n)
        : buf.subarray(at, at + n)
      return {
        kind: 'planar', width: w, height: h, bitDepth: deep ? 10 : 8, subsampling: s444 ? '444' : '422',
        y: plane(0, ySize), cb: plane(ySize, cSize), cr: plane(ySize + cSize, cSize),
      }
    },
  }
}

/**
 * Engine threads a chunk is measured on by default: every core but one, which ffmpeg's
 * decoding keeps busy (ProRes grain takes about 0.8 core-seconds a second of 1080p25 here).
 * Measured on this project's 2-core machine (tests/bench/clip-measure.ts with
 * LW_CLIP_ENGINE_THREADS=1 and 2, the clips of npm run bench:clip, December 2026): one engine
 * thread beside ffmpeg beat two on clean graphics (4.2 s against 5.4 s for 10 s of 1080p25),
 * two beat one on grain (20.6 s against 25.3 s); so a 2-core machine gets one.
 */
export function defaultEngineThreads(): number {
  return Math.max(1, availableParallelism() - 1)
}

export interface MeasureOptions {
  /** A path or a URL ffmpeg can read (a presigned S3 GET). */
  input: string
  probe: Pick<ClipProbe, 'width' | 'height' | 'chroma' | 'bitDepth' | 'rangeTag' | 'rate'>
  /** First frame (0-based) and how many. */
  start: number
  count: number
  matrix: MatrixName
  rgbRange: SourceRange
  spec: DeliverySpec
  threads?: number
  /**
   * Engine threads (default 1: the calling thread measures). With more, frames are dealt to
   * that many worker threads, two frame buffers each, so a chunk uses more than one core.
   */
  engineThreads?: number
  /** Called about once a second with frames done so far; return false to stop (cancel). */
  onProgress?: (framesDone: number) => Promise<boolean> | boolean
}

export interface MeasureResult {
  timeline: Timeline
  /** Frames measured: fewer than asked where the file breaks off. */
  measured: number
  /** ffmpeg's complaint when decoding stopped early or met damage. */
  error: string | null
  cancelled: boolean
}

/** The ffmpeg arguments for frames [start, start+count), seeking on a frame boundary. */
export function ffmpegArgs(o: Pick<MeasureOptions, 'input' | 'start' | 'count' | 'threads'> & { rate: { num: number, den: number } }, plan: Pick<DecodePlan, 'pixFmt' | 'filters'>): string[] {
  const args = ['-hide_banner', '-v', 'error', '-nostdin', '-threads', String(o.threads ?? 2)]
  // Input seeking is exact while transcoding (ffmpeg decodes from the key frame before and
  // drops what precedes the position). Half a frame before frame `start` keeps rounding of the
  // 1001 rates from ever landing on the wrong side of a frame's time.
  if (o.start > 0) args.push('-ss', ((o.start - 0.5) * o.rate.den / o.rate.num).toFixed(6))
  args.push('-i', o.input, '-map', '0:v:0', '-an', '-sn', '-dn', '-frames:v', String(o.count), '-fps_mode', 'passthrough')
  if (plan.filters.length) args.push('-vf', plan.filters.join(','))
  args.push('-f', 'rawvideo', '-pix_fmt', plan.pixFmt, 'pipe:1')
  return args
}

/**
 * Where frames go to be measured: the calling thread, one frame buffer reused; or a pool of
 * engine threads (measure-thread.ts), each frame in a buffer of its own, handed over and
 * back without copying. `take` waits for a free buffer, so the pipe is read no faster than
 * the engine keeps up and memory stays a few frames whatever the clip's length.
 */
interface FrameSink {
  take(): Promise<Uint8Array>
  measure(i: number, frame: Uint8Array): void
  /** Waits for every frame handed over so far. */
  drain(): Promise<void>
  close(): Promise<void>
}

function inlineSink(o: MeasureOptions, plan: DecodePlan, timeline: Timeline): FrameSink {
  const frame = new Uint8Array(plan.frameBytes)
  return {
    take: async () => frame,
    measure(i, buf) {
      // No spatial distributions unless the spec judges on them: a timeline is never re-judged from levels.
      recordFrame(timeline, i, analyseFrame(plan.make(buf), { matrix: o.matrix, spec: o.spec, spatialLevels: false }), o.spec)
    },
    drain: async () => {},
    close: async () => {},
  }
}

function threadSink(o: MeasureOptions, plan: DecodePlan, timeline: Timeline, threads: number): FrameSink {
  const data = { source: o.probe, rgbRange: o.rgbRange, matrix: o.matrix, spec: o.spec }
  const pool = Array.from({ length: threads }, () => new Worker(new URL('./measure-thread.mjs', import.meta.url), { workerData: data }))
  const free: ArrayBuffer[] = Array.from({ length: threads * 2 }, () => new ArrayBuffer(plan.frameBytes))
  let inFlight = 0
  let next = 0
  let failure: Error | null = null
  let wake: (() => void) | null = null
  const nudge = () => { const w = wake; wake = null; w?.() }
  for (const w of pool) {
    w.on('message', ({ i, row, buf }: { i: number, row: Timeline, buf: ArrayBuffer }) => {
      copyTimeline(timeline, row, i)
      free.push(buf)
      inFlight--
      nudge()
    })
    w.on('error', (e: unknown) => { failure ??= e instanceof Error ? e : new Error(String(e)); nudge() })
    w.on('exit', (code) => { if (code !== 0) failure ??= new Error(`an engine thread stopped (exit code ${code})`); nudge() })
  }
  const until = async (ready: () => boolean) => {
    while (!ready()) {
      if (failure) throw failure
      await new Promise<void>((r) => { wake = r })
    }
    if (failure) throw failure
  }
  return {
    async take() {
      await until(() => free.length > 0)
      return new Uint8Array(free.pop()!)
    },
    measure(i, frame) {
      inFlight++
      const buf = frame.buffer as ArrayBuffer
      pool[next]!.postMessage({ i, buf }, [buf])
      next = (next + 1) % pool.length
    },
    drain: () => until(() => inFlight === 0),
    async close() {
      for (const w of pool) w.removeAllListeners('exit')
      await Promise.all(pool.map((w) => w.terminate()))
    },
  }
}

export async function measureFrames(o: MeasureOptions): Promise<MeasureResult> {
  const plan = decodePlan(o.probe, o.rgbRange)
  const timeline = emptyTimeline(o.count)
  const threads = Math.max(1, Math.min(o.engineThreads ?? 1, 16))
  const sink = threads > 1 ? threadSink(o, plan, timeline, threads) : inlineSink(o, plan, timeline)
  const proc = spawn(FFMPEG, ffmpegArgs({ ...o, rate: o.probe.rate }, plan), { stdio: ['ignore', 'pipe', 'pipe'] })
  let stderr = ''
  proc.stderr.on('data', (d: Buffer) => { if (stderr.length < 4000) stderr += d.toString('utf8') })
  const exited = new Promise<number | null>((resolve) => proc.on('close', (code) => resolve(code)))
  const spawnError = new Promise<Error>((resolve) => proc.on('error', resolve))
  let frame = await sink.take()
  let filled = 0
  let done = 0
  let cancelled = false
  let lastReport = Date.now()
  try {
    for await (const chunk of proc.stdout as AsyncIterable<Buffer>) {
      let at = 0
      while (at < chunk.length) {
        const take = Math.min(chunk.length - at, plan.frameBytes - filled)
        frame.set(chunk.subarray(at, at + take), filled)
        filled += take
        at += take
        if (filled < plan.frameBytes) break
        filled = 0
        if (done < o.count) {
          sink.measure(done, frame)
          done++
          frame = await sink.take()
        }
      }
      if (o.onProgress && Date.now() - lastReport > 1000) {
        lastReport = Date.now()
        if (!(await o.onProgress(done))) { cancelled = true; proc.kill('SIGKILL'); break }
      }
    }
    if (!cancelled) await sink.drain()
  } finally {
    if (proc.exitCode === null) proc.kill('SIGKILL')
    await sink.close()
  }
  const code = await Promise.race([exited, spawnError.then((e) => { throw new Error(`ffmpeg could not start: ${e.message}`) })])
  const said = stderr.split('\n').map((l) => l.trim()).filter(Boolean)
  let error: string | null = null
  if (!cancelled && (code !== 0 || done < o.count)) {
    error = said.slice(-2).join('; ').slice(0, 400) || (code !== 0 ? `ffmpeg stopped with exit code ${code}` : 'the file ends here')
  }
  if (o.onProgress && !cancelled) await o.onProgress(done)
  return { timeline: done < o.count ? sliceTimeline(timeline, done) : timeline, measured: done, error, cancelled }
}
