import { and, eq, inArray } from 'drizzle-orm'
import type { Db } from '../db/client'
import * as t from '../db/schema'
import type { Decision } from '../../shared/utils/decisions'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

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
