import { asc, eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import type { LimitWorst } from '../../../../shared/utils/clip-timeline'
import { fromScale, toScale, type LevelScale } from '../../../../shared/engine/scales'
import { specForProduction } from '../../../lib/specs'

/** One clip: what it is, its progress, its events (with the decision on each event's frame) and its kept frames. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { clip } = await requireClip(event, id, 'view')
  const db = useDb()
  const events = await db.select({
    id: tables.clipEvents.id, seq: tables.clipEvents.seq, startFrame: tables.clipEvents.startFrame, endFrame: tables.clipEvents.endFrame,
    tcIn: tables.clipEvents.tcIn, tcOut: tables.clipEvents.tcOut, verdict: tables.clipEvents.verdict, limits: tables.clipEvents.limits,
    worstFrame: tables.clipEvents.worstFrame, frameId: tables.clipEvents.frameId,
    decision: tables.decisions.decision, note: tables.decisions.note,
  }).from(tables.clipEvents)
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, tables.clipEvents.frameId))
    .where(eq(tables.clipEvents.clipId, clip.id)).orderBy(asc(tables.clipEvents.seq))
  const kept = await db.select({ frameNumber: tables.clipFrames.frameNumber, frameId: tables.clipFrames.frameId, kind: tables.clipFrames.kind })
    .from(tables.clipFrames).where(eq(tables.clipFrames.clipId, clip.id)).orderBy(asc(tables.clipFrames.frameNumber))
  const [reel] = await db.select({ productionId: tables.reels.productionId }).from(tables.reels).where(eq(tables.reels.id, clip.reelId)).limit(1)
  const { spec } = await specForProduction(db, reel!.productionId)
  // The spec's luma and composite limits on the chart's IRE scale.
  const limits = spec.limits.filter((l) => l.quantity === 'luma' || l.quantity === 'composite')
    .map((l) => ({ id: l.id, label: l.label, ire: Math.round(toScale(fromScale(l.value, l.unit as LevelScale), 'ire') * 10) / 10 }))
  return {
    clip: clipView(clip),
    spec: { name: spec.name, title: spec.title },
    limits,
    progress: await clipProgress(clip),
    events: events.map((e) => ({ ...e, limits: e.limits as LimitWorst[], durationFrames: e.endFrame - e.startFrame + 1 })),
    kept,
  }
})
