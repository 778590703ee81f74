import { and, asc, desc, eq, gt, lt } from 'drizzle-orm'
import { builtinSpec } from '../../../../shared/engine/specs'
import { IdParams } from '../../../../shared/utils/validation'
import { specForProduction } from '../../../lib/specs'

/**
 * One frame: its record and, once analysed, the analysis with the same field names as
 * `npm run analyse -- --json`, plus the histograms, the URLs of its images, the current
 * decision, its neighbours in the reel and where it belongs.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { frame, role } = await requireFrame(event, id, 'view')
  const db = useDb()
  const [a] = await db.select().from(tables.analyses).where(eq(tables.analyses.frameId, frame.id)).limit(1)
  const [d] = await db.select({ decision: tables.decisions, by: { id: tables.users.id, name: tables.users.name } }).from(tables.decisions)
    .leftJoin(tables.users, eq(tables.users.id, tables.decisions.decidedBy)).where(eq(tables.decisions.frameId, frame.id)).limit(1)
  const [prev] = await db.select({ id: tables.frames.id }).from(tables.frames)
    .where(and(eq(tables.frames.reelId, frame.reelId), lt(tables.frames.seq, frame.seq))).orderBy(desc(tables.frames.seq)).limit(1)
  const [next] = await db.select({ id: tables.frames.id }).from(tables.frames)
    .where(and(eq(tables.frames.reelId, frame.reelId), gt(tables.frames.seq, frame.seq))).orderBy(asc(tables.frames.seq)).limit(1)
  const [reel] = await db.select({
    id: tables.reels.id, name: tables.reels.name, sourceLabel: tables.reels.sourceLabel, sourceRange: tables.reels.sourceRange,
    matrix: tables.reels.matrix, signedAt: tables.reels.signedAt, productionId: tables.productions.id, productionName: tables.productions.name,
  }).from(tables.reels).innerJoin(tables.productions, eq(tables.productions.id, tables.reels.productionId)).where(eq(tables.reels.id, frame.reelId))
  const current = await specForProduction(db, reel!.productionId)
  const { objectKey: _k, sha256: _s, ...pub } = frame
  return {
    frame: pub,
    role,
    reel,
    neighbours: { prevId: prev?.id ?? null, nextId: next?.id ?? null },
    decision: d
      ? {
          decision: d.decision.decision, note: d.decision.note, decidedBy: d.by?.id ? d.by : null, decidedAt: d.decision.updatedAt,
          recheckAt: d.decision.recheckAt, recheckNote: d.decision.recheckNote,
        }
      : null,
    analysis: a
      ? {
          ...(a.result as object),
          specVersion: a.specVersion,
          // The title of a team's own spec is not in the stored result; the production's spec has it when it is the one.
          specTitle: current.spec.name === a.specName ? current.spec.title : (builtinSpec(a.specName)?.title ?? a.specName),
          // Packed level distributions: the frame page judges them against another spec in the browser.
          levels: a.levels,
          analysedAt: a.createdAt,
          durationMs: a.durationMs,
          histograms: a.histograms,
          // `picture` (the viewing copy) is made on first request, so it is not in the stored list.
          images: Object.fromEntries([...(a.images as string[]), 'picture'].map((k) => [k, `/api/frames/${frame.id}/images/${k}`])),
        }
      : null,
  }
})
