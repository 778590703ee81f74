import { and, asc, eq, inArray } from 'drizzle-orm'
import type { DbOrTx, Tx } from '../db/client'
import * as t from '../db/schema'
import type { Decision } from '../../shared/utils/decisions'


/**
 * Records a decision on analysed frames of one reel (the reel whose open state was checked) (upsert, one per frame) and audits each
 * change with the previous value. Frames not analysed yet are skipped and reported.
 */
export async function recordDecisions(tx: Tx, args: { teamId: number; reelId: number; frameIds: number[]; userId: number; decision: Decision; note: string }) {
  const frames = await tx.select({ id: t.frames.id, status: t.frames.status, prev: t.decisions.decision, prevNote: t.decisions.note })
    .from(t.frames).leftJoin(t.decisions, eq(t.decisions.frameId, t.frames.id))
    .where(and(eq(t.frames.teamId, args.teamId), eq(t.frames.reelId, args.reelId), inArray(t.frames.id, args.frameIds))).for('update')
  // A file that never decoded can only be rejected: there is no measurement to accept or waive,
  // and a sign-off needs every such frame either rejected or gone.
  const ready = frames.filter((f) => f.status === 'done' || (f.status === 'failed' && args.decision === 'rejected'))
  for (const f of ready) {
    await tx.insert(t.decisions).values({ frameId: f.id, teamId: args.teamId, decision: args.decision, note: args.note, decidedBy: args.userId })
      .onDuplicateKeyUpdate({ set: { decision: args.decision, note: args.note, decidedBy: args.userId, recheckAt: null, recheckNote: null } })
    await tx.insert(t.auditLog).values({
      teamId: args.teamId, actorId: args.userId, action: 'frame.decided', subjectType: 'frame', subjectId: f.id,
      details: { decision: args.decision, note: args.note, previous: f.prev ? { decision: f.prev, note: f.prevNote } : null },
    })
  }
  const readyIds = new Set(ready.map((f) => f.id))
  return { updated: ready.length, updatedIds: [...readyIds], notReady: frames.filter((f) => !readyIds.has(f.id)).map((f) => f.id), found: frames.map((f) => f.id) }
}

/** One step in a frame's decision history, read back from the audit log. */
export interface DecisionEvent {
  frameId: number
  at: Date
  /** `cleared` when a reviewer withdrew the decision. */
  decision: Decision | 'cleared'
  note: string
  by: string | null
}

/**
 * Every decision made on the given frames, oldest first: the decisions table holds only the
 * standing one, the audit log keeps each change with who made it and when.
 */
export async function decisionHistory(db: DbOrTx, teamId: number, frameIds: number[]): Promise<DecisionEvent[]> {
  if (!frameIds.length) return []
  const rows = await db.select({
    frameId: t.auditLog.subjectId, at: t.auditLog.createdAt, action: t.auditLog.action, details: t.auditLog.details, by: t.users.name,
  }).from(t.auditLog).leftJoin(t.users, eq(t.users.id, t.auditLog.actorId))
    .where(and(
      eq(t.auditLog.teamId, teamId), eq(t.auditLog.subjectType, 'frame'),
      inArray(t.auditLog.action, ['frame.decided', 'frame.decision_cleared']), inArray(t.auditLog.subjectId, frameIds),
    ))
    .orderBy(asc(t.auditLog.createdAt), asc(t.auditLog.id))
  return rows.map((r) => {
    const d = (r.details ?? {}) as { decision?: Decision; note?: string; previous?: { note?: string } | null }
    const cleared = r.action === 'frame.decision_cleared'
    return {
      frameId: r.frameId!, at: r.at, by: r.by ?? null,
      decision: cleared ? 'cleared' as const : d.decision!,
      note: cleared ? '' : d.note ?? '',
    }
  })
}
