import { and, asc, desc, eq, gt, isNull, lt, ne } from 'drizzle-orm'
import { builtinSpec } from '../../../../shared/engine/specs'
import type { FrameImageKind } from '../../../../shared/utils/frame-images'
import { IdParams } from '../../../../shared/utils/validation'
import { decisionHistory } from '../../../lib/decisions'
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
  // The next measured frame nobody has decided, after this one and then from the top: where a
  // reviewer working through the reel goes after saving.
  const undecided = (after: boolean) => db.select({ id: tables.frames.id }).from(tables.frames)
    .leftJoin(tables.decisions, eq(tables.decisions.frameId, tables.frames.id))
    .where(and(
      eq(tables.frames.reelId, frame.reelId), eq(tables.frames.status, 'done'), isNull(tables.decisions.id), ne(tables.frames.id, frame.id),
      ...(after ? [gt(tables.frames.seq, frame.seq)] : []),
    )).orderBy(asc(tables.frames.seq)).limit(1)
  const later = await undecided(true)
  const [nextUndecided] = later.length ? later : await undecided(false)
  const history = await decisionHistory(db, frame.teamId, [frame.id])
  const [reel] = await db.select({
    id: tables.reels.id, name: tables.reels.name, sourceLabel: tables.reels.sourceLabel, sourceRange: tables.reels.sourceRange,
    matrix: tables.reels.matrix, signedAt: tables.reels.signedAt, productionId: tables.productions.id, productionName: tables.productions.name,
  }).from(tables.reels).innerJoin(tables.productions, eq(tables.productions.id, tables.reels.productionId)).where(eq(tables.reels.id, frame.reelId))
  // The foreign keys keep this row; a miss means the reel went while this request ran.
  if (!reel) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const current = await specForProduction(db, reel.productionId)
  const { objectKey: _k, sha256: _s, ...pub } = frame
  return {
    frame: pub,
    role,
    reel,
    neighbours: { prevId: prev?.id ?? null, nextId: next?.id ?? null, nextUndecidedId: nextUndecided?.id ?? null },
    history: history.map(({ frameId: _f, ...h }) => h),
    decision: d
      ? {
          decision: d.decision.decision, note: d.decision.note, decidedBy: d.by?.id ? d.by : null, decidedAt: d.decision.updatedAt,
          recheckAt: d.decision.recheckAt, recheckNote: d.decision.recheckNote,
        }
      : null,
    analysis: a
      ? {
          ...a.result,
          specVersion: a.specVersion,
          // The title of a team's own spec is not in the stored result; the production's spec has it when it is the one.
          specTitle: current.spec.name === a.specName ? current.spec.title : (builtinSpec(a.specName)?.title ?? a.specName),
          // Packed level distributions: the frame page judges them against another spec in the browser.
          levels: a.levels,
          analysedAt: a.createdAt,
          durationMs: a.durationMs,
          histograms: a.histograms,
          // A frame analysed before the viewing copy was stored lists none until the worker
          // makes it; the page shows the thumbnail meanwhile.
          images: Object.fromEntries(a.images.map((k) => [k, `/api/frames/${frame.id}/images/${k}`])) as Partial<Record<FrameImageKind, string>>,
        }
      : null,
  }
})
