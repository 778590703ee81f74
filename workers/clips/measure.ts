// Measures a run of a clip's frames as ffmpeg decodes them: raw planar Y'CbCr at the
// source's depth (R'G'B' sources as R'G'B') arrives on a pipe, one frame buffer is reused,
// and each frame goes through the engine (statistics, shares, level distributions; no
// densities) into a timeline row. Memory stays one frame plus the pipe's buffer, whatever
// the clip's length; nothing is written to local disk.
import { spawn } from 'node:child_process'
import { analyseFrame } from '../../shared/engine/analyse'
import type { DeliverySpec } from '../../shared/engine/specs'
import type { FrameInput, MatrixName, SourceRange } from '../../shared/engine/types'
import { emptyTimeline, recordFrame, sliceTimeline, type Timeline } from '../../shared/utils/clip-timeline'
import type { ClipProbe } from '../../server/lib/clips/probe'

const FFMPEG = process.env.FFMPEG ?? 'ffmpeg'

export interface DecodePlan {
  pixFmt: string
  frameBytes: number
  filters: string[]
  make: (buf: Uint8Array) => FrameInput
}

/** How a clip is piped to the engine: the pixel format asked of ffmpeg and the view of each frame. */
export function decodePlan(p: Pick<ClipProbe, 'width' | 'height' | 'chroma' | 'bitDepth' | 'rangeTag'>, rgbRange: SourceRange): DecodePlan {
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

export async function measureFrames(o: MeasureOptions): Promise<MeasureResult> {
  const plan = decodePlan(o.probe, o.rgbRange)
  const timeline = emptyTimeline(o.count)
  const proc = spawn(FFMPEG, ffmpegArgs({ ...o, rate: o.probe.rate }, plan), { stdio: ['ignore', 'pipe', 'pipe'] })
  let stderr = ''
  proc.stderr.on('data', (d: Buffer) => { if (stderr.length < 4000) stderr += d.toString('utf8') })
  const exited = new Promise<number | null>((resolve) => proc.on('close', (code) => resolve(code)))
  const spawnError = new Promise<Error>((resolve) => proc.on('error', resolve))
  // One frame's buffer, reused: the engine is done with a frame before the next fills it.
  const frame = new Uint8Array(plan.frameBytes)
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
          // No spatial distributions unless the spec judges on them: a timeline is never re-judged from levels.
          const a = analyseFrame(plan.make(frame), { matrix: o.matrix, spec: o.spec, spatialLevels: false })
          recordFrame(timeline, done, a, o.spec)
          done++
        }
      }
      if (o.onProgress && Date.now() - lastReport > 1000) {
        lastReport = Date.now()
        if (!(await o.onProgress(done))) { cancelled = true; proc.kill('SIGKILL'); break }
      }
    }
  } finally {
    if (proc.exitCode === null) proc.kill('SIGKILL')
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
