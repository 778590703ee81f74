// Shapes of the frame routes' JSON for the frame and compare pages, inferred from the routes
// (see app/types/api.ts): dates arrive as ISO strings.
import type { ApiGet, FrameListRow } from '../types/api'
import type { FrameImageKind } from '../../shared/utils/frame-images'

export type { FrameImageKind }

export type FrameDetail = ApiGet<'/api/frames/:id'>
export type FrameRecord = FrameDetail['frame']
export type FrameReelView = FrameDetail['reel']
export type FrameDecisionView = NonNullable<FrameDetail['decision']>
export type FrameAnalysisView = NonNullable<FrameDetail['analysis']>
export type FrameHistogramsJson = FrameAnalysisView['histograms']

export type LineResponse = ApiGet<'/api/frames/:id/line/:n'>
export type LineSampleJson = LineResponse['line']['samples'][number]

/** One row of GET /api/reels/:id/frames, as far as the frame picker reads it. */
export type PickerFrameRow = Pick<FrameListRow, 'id' | 'seq' | 'name' | 'timecode' | 'status' | 'verdict' | 'thumbUrl'>
export type DecisionStepView = FrameDetail['history'][number]
