// What the routes answer, as the app receives it (JSON: dates are ISO strings). Inferred by
// Nitro from each route's handler (`InternalApi`), never written by hand: change a route and
// these change with it.
import type { InternalApi } from 'nitropack/types'

/** The JSON a GET route answers. */
export type ApiGet<R extends keyof InternalApi> = InternalApi[R] extends { get: infer T } ? T : never

export type ProductionListItem = ApiGet<'/api/teams/:teamId/productions'>[number]
export type ProductionDetail = ApiGet<'/api/productions/:id'>
export type ReelOverviewRow = ProductionDetail['reels'][number]
export type ReelDetail = ApiGet<'/api/reels/:id'>
export type FrameListPage = ApiGet<'/api/reels/:id/frames'>
export type FrameListRow = FrameListPage['frames'][number]
export type FrameDecisionInfo = NonNullable<FrameListRow['decision']>
export type MemberRow = ApiGet<'/api/teams/:teamId/members'>[number]
export type PendingInvitation = ApiGet<'/api/teams/:teamId/invitations'>[number]
export type SheetPage = ApiGet<'/api/reels/:id/sheet'>
export type ApiTokenRow = ApiGet<'/api/teams/:teamId/tokens'>[number]
export type ReelSheetState = ReelDetail['sheet']
export type SpecListRow = ApiGet<'/api/teams/:teamId/specs'>['specs'][number]
export type SpecDetail = ApiGet<'/api/specs/:id'>

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
