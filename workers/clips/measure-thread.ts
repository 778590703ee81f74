// One engine thread of measureFrames (measure.ts): frames arrive as transferred buffers,
// each is measured by the same engine and written into a one-row timeline, and the row goes
// back with the buffer, which the reader fills again. The engine is synchronous, so threads
// are how a chunk uses more than one core.
import { parentPort, workerData } from 'node:worker_threads'
import { analyseFrame } from '../../shared/engine/analyse'
import type { DeliverySpec } from '../../shared/engine/specs'
import type { MatrixName, SourceRange } from '../../shared/engine/types'
import { emptyTimeline, recordFrame } from '../../shared/utils/clip-timeline'
import { decodePlan, type PlanSource } from './measure'

export interface EngineThreadData { source: PlanSource, rgbRange: SourceRange, matrix: MatrixName, spec: DeliverySpec }
export interface EngineThreadFrame { i: number, buf: ArrayBuffer }

const { source, rgbRange, matrix, spec } = workerData as EngineThreadData
const plan = decodePlan(source, rgbRange)
parentPort!.on('message', ({ i, buf }: EngineThreadFrame) => {
  const a = analyseFrame(plan.make(new Uint8Array(buf, 0, plan.frameBytes)), { matrix, spec, spatialLevels: false })
  const row = emptyTimeline(1)
  recordFrame(row, 0, a, spec)
  parentPort!.postMessage({ i, row, buf }, [buf])
})
