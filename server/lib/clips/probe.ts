// ffprobe before anything else: what the clip is, and whether it can be measured at all.
// parseProbe is pure (tested on ffprobe's JSON of generated clips); probeClip runs ffprobe
// on a path or a presigned URL (ffprobe reads only the headers it needs, by range requests).
import { execFile } from 'node:child_process'
import { canDropFrame, framesToTimecode, parseTimecode, timecodeToFrames, type FrameRate } from '../../../shared/utils/timecode'
import { CLIP_LIMITS } from '../../../shared/utils/clips'

/** A clip that cannot be measured; the message is for the person who sent it. */
export class ClipRefusal extends Error {
  override name = 'ClipRefusal'
}

export type ClipChroma = '420' | '422' | '444' | 'gray' | 'rgb'

export interface ClipProbe {
  container: string
  codec: string
  width: number
  height: number
  rate: FrameRate
  /** Drop-frame labels: from the start timecode's ';', else the rate's custom (29.97/59.94). */
  dropFrame: boolean
  durationS: number
  frameCount: number
  startTimecode: string
  startTimecodeFound: boolean
  startTimecodeSource: 'stream' | 'tmcd' | 'format' | 'none'
  pixFmt: string
  bitDepth: number
  chroma: ClipChroma
  /** Matrix and range from the file's tags; null where the file does not say (the reel's settings then apply). */
  matrixTag: '601' | '709' | null
  rangeTag: 'studio' | 'full' | null
  colourTags: { space: string | null, range: string | null, primaries: string | null, transfer: string | null }
  fieldOrder: string
  audioStreams: number
}

type Stream = Record<string, unknown> & { codec_type?: string, tags?: Record<string, string>, disposition?: Record<string, number> }
export interface FfprobeJson { streams?: Stream[], format?: Record<string, unknown> & { tags?: Record<string, string> } }

const STILL_CODECS = new Set(['png', 'mjpeg', 'jpegls', 'bmp', 'tiff', 'webp', 'gif', 'jpeg2000', 'apng', 'qoi'])

function ratio(text: unknown): FrameRate | null {
  const m = /^(\d+)\/(\d+)$/.exec(String(text ?? ''))
  if (!m) return null
  const num = Number(m[1])
  const den = Number(m[2])
  if (!num || !den) return null
  return { num, den }
}

/** 30000/1001 stays as it is; ffprobe's 2997/100 style is put back to the 1001 form. */
function normaliseRate(r: FrameRate): FrameRate {
  const f = r.num / r.den
  for (const n of [24, 30, 48, 60, 120]) {
    if (Math.abs(f - (n * 1000) / 1001) < 0.001) return { num: n * 1000, den: 1001 }
  }
  if (Math.abs(f - Math.round(f)) < 0.0005) return { num: Math.round(f), den: 1 }
  return r
}

export function chromaOf(pixFmt: string): ClipChroma {
  if (/^(gray|ya)/.test(pixFmt)) return 'gray'
  if (/^(rgb|bgr|gbr|argb|abgr|rgba|bgra|0rgb|rgb0|0bgr|bgr0|x2rgb|x2bgr)/.test(pixFmt)) return 'rgb'
  if (/^(yuv|yuva|yuvj)444|^(ayuv|vuya|vuyx|xv3|y410|y412|v30x|xv30|xv36)/.test(pixFmt)) return '444'
  if (/^(yuv|yuva|yuvj)422|^(uyvy|yuyv|yvyu|y210|y212|v210|p210|p216|nv16|nv20)/.test(pixFmt)) return '422'
  return '420'
}

export function depthOf(pixFmt: string, bitsPerRawSample: unknown): number {
  const raw = Number(bitsPerRawSample)
  if (Number.isInteger(raw) && raw >= 8 && raw <= 16) return raw
  const m = /[a-z](9|10|12|14|16)(le|be)$/.exec(pixFmt)
  if (m) return Number(m[1])
  if (/^(y210|p210|x2rgb|x2bgr|xv30|v30x|y410|v210)/.test(pixFmt)) return 10
  if (/^(y212|xv36|y412)/.test(pixFmt)) return 12
  if (/(48|64)(le|be)$/.test(pixFmt)) return 16
  return 8
}

function matrixTag(space: string | null): '601' | '709' | null {
  if (!space) return null
  if (space === 'bt709') return '709'
  if (space === 'smpte170m' || space === 'bt470bg' || space === 'fcc') return '601'
  return null
}

/** Reads ffprobe's JSON and refuses what cannot be measured, each with its reason. */
export function parseProbe(j: FfprobeJson, bytes: number): ClipProbe {
  if (bytes > CLIP_LIMITS.maxBytes) throw new ClipRefusal(`The clip is larger than ${CLIP_LIMITS.maxBytes / 2 ** 30} GiB`)
  const streams = j.streams ?? []
  const audio = streams.filter((s) => s.codec_type === 'audio').length
  const videos = streams.filter((s) => s.codec_type === 'video')
  const moving = videos.filter((s) => !s.disposition?.attached_pic)
  if (!videos.length && audio) throw new ClipRefusal(`This file holds audio only (${audio} audio stream${audio > 1 ? 's' : ''}) and no picture to measure`)
  if (!videos.length) throw new ClipRefusal('This file has no video stream')
  if (!moving.length) throw new ClipRefusal('The only picture in this file is cover art (an attached still); upload the picture itself as a still')
  const v = moving[0]!
  const container = String(j.format?.format_name ?? 'unknown')
  const codec = String(v.codec_name ?? 'unknown')
  const width = Number(v.width)
  const height = Number(v.height)
  if (!width || !height) throw new ClipRefusal(`The video stream (${codec}) has no picture size; ffmpeg cannot decode it`)
  if (width * height > CLIP_LIMITS.maxPixels) throw new ClipRefusal(`The picture is ${width}×${height}, more than the ${CLIP_LIMITS.maxPixels / 1e6} megapixel limit`)
  const pixFmt = String(v.pix_fmt ?? '')
  if (!pixFmt || pixFmt === 'unknown') throw new ClipRefusal(`The video stream (${codec}) has no pixel format that ffmpeg can decode`)
  const nbFrames = Number(v.nb_frames)
  const imageContainer = /image2|_pipe$/.test(container)
  if (imageContainer || (STILL_CODECS.has(codec) && nbFrames === 1)) {
    throw new ClipRefusal(`This is a still picture (${codec} in ${container}), not a clip; upload it as a still`)
  }
  const rate = ratio(v.avg_frame_rate) ?? ratio(v.r_frame_rate)
  if (!rate) throw new ClipRefusal('The video stream has no frame rate')
  const r = normaliseRate(rate)
  const fps = r.num / r.den
  const streamDuration = Number(v.duration)
  const formatDuration = Number(j.format?.duration)
  const durationS = Number.isFinite(streamDuration) && streamDuration > 0 ? streamDuration : Number.isFinite(formatDuration) ? formatDuration : 0
  const frameCount = Number.isInteger(nbFrames) && nbFrames > 0 ? nbFrames : Math.round(durationS * fps)
  if (frameCount <= 0 || durationS <= 0 && !(nbFrames > 0)) throw new ClipRefusal('The clip has zero duration: no frame to measure')
  if (frameCount === 1) throw new ClipRefusal(`This clip is one frame long (${codec}): upload it as a still`)
  if (frameCount > CLIP_LIMITS.maxFrames) throw new ClipRefusal(`The clip has ${frameCount} frames, more than 24 hours at 60 fps`)

  // Start timecode: the video stream's tag, a tmcd (timecode) track's, then the container's.
  const tmcd = streams.find((s) => s.codec_type === 'data' && (s.codec_tag_string === 'tmcd' || s.tags?.timecode))
  const found: [ClipProbe['startTimecodeSource'], string | undefined][] = [
    ['stream', v.tags?.timecode], ['tmcd', tmcd?.tags?.timecode], ['format', j.format?.tags?.timecode],
  ]
  const hit = found.find(([, tc]) => tc && parseTimecode(tc))
  const parsed = hit ? parseTimecode(hit[1]!)! : null
  const dropFrame = parsed ? parsed.dropFrame && canDropFrame(r) : canDropFrame(r)
  let startTimecode = framesToTimecode(0, r, dropFrame)
  if (parsed) {
    // Put into canonical form at this rate (a label the rate cannot have is reported, not used).
    try {
      startTimecode = framesToTimecode(timecodeToFrames(parsed, r, dropFrame), r, dropFrame)
    } catch (e) {
      throw new ClipRefusal(`The clip's start timecode ${hit![1]} cannot exist at ${fps.toFixed(3)} fps: ${(e as Error).message}`)
    }
  }
  const tag = (k: string) => (typeof v[k] === 'string' && v[k] !== 'unknown' ? v[k] as string : null)
  const space = tag('color_space')
  const range = tag('color_range')
  const chroma = chromaOf(pixFmt)
  const full = range === 'pc' || /^yuvj/.test(pixFmt)
  return {
    container, codec, width, height, rate: r, dropFrame, durationS, frameCount,
    startTimecode, startTimecodeFound: !!parsed, startTimecodeSource: hit?.[0] ?? 'none',
    pixFmt, bitDepth: depthOf(pixFmt, v.bits_per_raw_sample), chroma,
    matrixTag: matrixTag(space), rangeTag: full ? 'full' : range === 'tv' ? 'studio' : null,
    colourTags: { space, range, primaries: tag('color_primaries'), transfer: tag('color_transfer') },
    fieldOrder: tag('field_order') ?? 'unknown',
    audioStreams: audio,
  }
}

const FFPROBE = process.env.FFPROBE ?? 'ffprobe'

/** Runs ffprobe on a path or URL. An unreadable file is a refusal, with ffprobe's own words. */
export function probeClip(input: string, bytes: number): Promise<ClipProbe> {
  return new Promise((resolve, reject) => {
    execFile(FFPROBE, ['-v', 'error', '-print_format', 'json', '-show_format', '-show_streams', input],
      { maxBuffer: 16 * 2 ** 20, timeout: 120_000 }, (err, stdout, stderr) => {
        if (err) {
          const said = String(stderr).split('\n').filter(Boolean).pop()?.replace(/^.*?: /, '') ?? err.message
          reject(new ClipRefusal(`ffmpeg cannot read this file as video: ${said.slice(0, 300)}`))
          return
        }
        try {
          resolve(parseProbe(JSON.parse(stdout) as FfprobeJson, bytes))
        } catch (e) {
          reject(e)
        }
      })
  })
}
