import { asc, eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import type { LimitWorst } from '../../../../shared/utils/clip-timeline'

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
  return {
    clip: clipView(clip),
    progress: await clipProgress(clip),
    events: events.map((e) => ({ ...e, limits: e.limits as LimitWorst[], durationFrames: e.endFrame - e.startFrame + 1 })),
    kept,
  }
})
