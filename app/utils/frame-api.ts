// Shapes of the frame routes' JSON (dates arrive as ISO strings), for the frame and compare pages.
import type { AnalysisJson } from '../../shared/utils/report'
import type { BarsJson, BlankingJson, MatchJson } from '../../shared/utils/lineup'
import type { Decision } from '../../shared/utils/decisions'
import type { Role } from '../../shared/utils/roles'
import type { FrameFormat, FrameStatus } from '../../shared/utils/uploads'

export type FrameImageKind = 'thumb' | 'picture' | 'overlay' | 'waveform-luma' | 'waveform-flat' | 'waveform-rgb' | 'vectorscope'

export interface FrameHistogramsJson {
  bins: number
  rgbCoding: 'source-full' | 'source-studio' | 'studio'
  y: number[]
  cb: number[]
  cr: number[]
  r: number[]
  g: number[]
  b: number[]
}

export type FrameAnalysisView = AnalysisJson & {
  specVersion: number
  analysedAt: string
  durationMs: number
  histograms: FrameHistogramsJson
  images: Partial<Record<FrameImageKind, string>>
  /** Line-up checks; absent on analyses stored before engine 1.2.0. */
  bars?: BarsJson
  blanking?: BlankingJson
  match?: MatchJson | null
}

export interface FrameRecord {
  id: number
  reelId: number
  teamId: number
  seq: number
  name: string
  timecode: string | null
  format: FrameFormat
  width: number
  height: number
  status: FrameStatus
  failReason: string | null
  createdAt: string
  updatedAt: string
}

export interface FrameDecisionView {
  decision: Decision
  note: string
  decidedBy: { id: number, name: string } | null
  decidedAt: string
}

export interface FrameReelView {
  id: number
  name: string
  sourceLabel: string
  sourceRange: 'full' | 'studio'
  matrix: '601' | '709'
  signedAt: string | null
  productionId: number
  productionName: string
}

export interface FrameDetail {
  frame: FrameRecord
  role: Role
  reel: FrameReelView
  neighbours: { prevId: number | null, nextId: number | null }
  decision: FrameDecisionView | null
  analysis: FrameAnalysisView | null
}

export interface LineSampleJson {
  x: number
  us: number
  lumaIre: number
  compMinIre: number
  compMaxIre: number
  chromaPpIre: number
  phaseDeg: number | null
  r: number
  g: number
  b: number
}

export interface LineResponse {
  frameId: number
  width: number
  height: number
  matrix: '601' | '709'
  line: { index: number, samples: LineSampleJson[] }
}

/** One row of GET /api/reels/:id/frames, as far as the frame picker reads it. */
export interface PickerFrameRow {
  id: number
  seq: number
  name: string
  timecode: string | null
  status: FrameStatus
  verdict: 'pass' | 'caution' | 'fail' | null
  thumbUrl: string | null
}
