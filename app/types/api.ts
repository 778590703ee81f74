import type { Role } from '#shared/utils/roles'
import type { Decision } from '#shared/utils/decisions'
import type { FrameFormat, FrameStatus } from '#shared/utils/uploads'

// Shapes of the JSON the routes answer with; dates arrive as ISO strings.
export interface ProductionRow { id: number; name: string; client: string; reelCount: number; createdAt: string; updatedAt: string }
export interface ReelRow {
  id: number; name: string; sourceLabel: string; sourceRange: 'full' | 'studio'; matrix: '601' | '709'
  signedAt?: string | null; createdAt: string; updatedAt: string
}
export interface SpecRef { id?: number | null; name: string; title: string; version: number }
export interface ReelCounts {
  total: number; queued: number; analysing: number; done: number; failed: number
  pass: number; caution: number; fail: number
  accepted: number; rejected: number; waived: number
}
export interface ReelOverviewRow extends ReelRow { counts: ReelCounts & { undecided: number }; lastActivity: string }
export interface ProductionDetail {
  id: number; teamId: number; name: string; client: string; createdAt: string; updatedAt: string; role: Role
  spec: SpecRef; reels: ReelOverviewRow[]
}
export interface ReelDetail extends ReelRow {
  teamId: number; productionId: number; role: Role
  production: { id: number; name: string }; spec: SpecRef; counts: ReelCounts
}
export interface FrameDecisionInfo { decision: Decision; note: string; decidedBy: { id: number; name: string } | null; decidedAt: string; recheck?: boolean }
export interface FrameListRow {
  id: number; seq: number; name: string; timecode: string | null; format: FrameFormat; width: number; height: number
  status: FrameStatus; failReason: string | null; createdAt: string
  verdict: 'pass' | 'caution' | 'fail' | null
  lumaMinIre: number | null; lumaMaxIre: number | null; lumaMeanIre: number | null
  compMinIre: number | null; compMaxIre: number | null; outShare: number | null
  thumbUrl: string | null; decision: FrameDecisionInfo | null
}
export interface FrameListPage { page: number; pageSize: number; total: number; frames: FrameListRow[] }
export interface MemberRow { userId: number; name: string; email: string; role: Role; since: string }
export interface InvitationRow { id: number; email: string; role: Role; expiresAt: string; createdAt: string }

/** GET /api/teams/:teamId/specs */
export interface SpecListRow {
  id: number
  builtin: string | null
  version: number
  updatedAt: string
  spec: import('#shared/engine/specs').DeliverySpec
  productions: number
}

/** GET /api/specs/:id */
export interface SpecDetail {
  id: number
  teamId: number
  builtin: string | null
  version: number
  role: Role
  spec: import('#shared/engine/specs').DeliverySpec
  versions: Array<{ version: number; body: import('#shared/engine/specs').DeliverySpec; changes: string[]; rejudge: { judged: number; changed: number; text: string; skippedSigned: number } | null; createdAt: string; by: string | null }>
  productions: Array<{ id: number; name: string }>
}

/** What re-judging would change (or changed): the answer of a preview or an apply. */
export interface RejudgeOutcome {
  preview: boolean
  judged: number
  changed: number
  text: string
  transitions: Array<{ from: 'pass' | 'caution' | 'fail'; to: 'pass' | 'caution' | 'fail'; count: number }>
  skippedSigned: number
  notStored: number
  version?: number
  changes?: string[]
  blocked?: string | null
  spec?: { id: number; title: string; version: number }
}
