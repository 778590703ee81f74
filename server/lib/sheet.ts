// Reading what a pass/fail sheet shows, for the routes and the worker alike (no Nuxt
// auto-imports here). The rows are read live: a signed reel is read-only, so while a
// sign-off stands its frames, analyses and decisions cannot change under it.
import { and, asc, desc, eq, isNull } from 'drizzle-orm'
import type { Db, DbOrTx } from '../db/client'
import * as t from '../db/schema'
import { decisionHistory } from './decisions'
import {
  signoffBlockers, summarise, type HistoryStep, type Overall, type SheetReason, type SheetRow, type SheetSummary,
} from './sheet-rules'
import { lineupLines } from '../../shared/utils/lineup'
import type { LineupAnalysisJson } from '../../shared/utils/lineup'

export type SignoffRow = typeof t.signoffs.$inferSelect

/** Object keys from ids only, beside the reel's other objects; one pair per sign-off. */
export const sheetKeys = {
  pdf: (teamId: number, reelId: number, signoffId: number) => `teams/${teamId}/reels/${reelId}/sheets/${signoffId}.pdf`,
  csv: (teamId: number, reelId: number, signoffId: number) => `teams/${teamId}/reels/${reelId}/sheets/${signoffId}.csv`,
}

/** The sheet's rows in index order; with `history`, each row carries its decision history (for the CSV). */
export async function loadSheetRows(db: DbOrTx, reelId: number, opts: { history?: boolean } = {}): Promise<SheetRow[]> {
  const rows = await db.select({
    frameId: t.frames.id, seq: t.frames.seq, name: t.frames.name, timecode: t.frames.timecode,
    status: t.frames.status, failReason: t.frames.failReason,
    verdict: t.analyses.verdict, lumaMinIre: t.analyses.lumaMinIre, lumaMaxIre: t.analyses.lumaMaxIre,
    compMaxIre: t.analyses.compMaxIre, outShare: t.analyses.outShare, result: t.analyses.result,
    specName: t.analyses.specName, specVersion: t.analyses.specVersion, engineVersion: t.analyses.engineVersion,
    decision: t.decisions.decision, note: t.decisions.note, decidedAt: t.decisions.updatedAt, decidedBy: t.users.name,
  }).from(t.frames)
    .leftJoin(t.analyses, eq(t.analyses.frameId, t.frames.id))
    .leftJoin(t.decisions, eq(t.decisions.frameId, t.frames.id))
    .leftJoin(t.users, eq(t.users.id, t.decisions.decidedBy))
    .where(eq(t.frames.reelId, reelId))
    .orderBy(asc(t.frames.seq))
  const byFrame = new Map<number, HistoryStep[]>()
  if (opts.history) {
    const [reel] = await db.select({ teamId: t.reels.teamId }).from(t.reels).where(eq(t.reels.id, reelId))
    for (const { frameId, ...step } of reel ? await decisionHistory(db, reel.teamId, rows.map((r) => r.frameId)) : []) {
      byFrame.set(frameId, [...(byFrame.get(frameId) ?? []), step])
    }
  }
  return rows.map(({ result, ...r }) => ({
    ...r,
    ...(opts.history ? { history: byFrame.get(r.frameId) ?? [] } : {}),
    // An analysis row can outlive a status flip; the sheet trusts the row, not the flag.
    verdict: r.status === 'done' ? r.verdict : null,
    note: r.note ?? '',
    reasons: (result?.reasons ?? []).map((x): SheetReason => ({ limit: x.limit, message: x.message, severity: x.severity })),
    lineup: r.status === 'done' ? lineupLines(result as LineupAnalysisJson | null) : [],
  }))
}

/** The standing sign-off of a reel (not superseded), if any. */
export async function currentSignoff(db: DbOrTx, reelId: number): Promise<SignoffRow | undefined> {
  const [row] = await db.select().from(t.signoffs)
    .where(and(eq(t.signoffs.reelId, reelId), isNull(t.signoffs.supersededAt)))
    .orderBy(desc(t.signoffs.id)).limit(1)
  return row
}

export async function signoffHistory(db: Db, reelId: number) {
  return db.select({
    id: t.signoffs.id, signerName: t.signoffs.signerName, signedAt: t.signoffs.signedAt, specTitle: t.signoffs.specTitle,
    specVersion: t.signoffs.specVersion, engineVersion: t.signoffs.engineVersion, sheetStatus: t.signoffs.sheetStatus,
    sheetError: t.signoffs.sheetError, summary: t.signoffs.summary, supersededAt: t.signoffs.supersededAt,
    reopenReason: t.signoffs.reopenReason, reopenedBy: t.users.name,
  }).from(t.signoffs).leftJoin(t.users, eq(t.users.id, t.signoffs.supersededBy))
    .where(eq(t.signoffs.reelId, reelId)).orderBy(desc(t.signoffs.id))
}

/**
 * Everything the sheet of one sign-off prints, read in one consistent snapshot. The first
 * statement is a locking read of the reel: it waits out a reopen in progress and holds off
 * the next one, and the plain reads after it see the state as of that lock. (An exclusive
 * lock: MariaDB has no FOR SHARE, and the reads take milliseconds.)
 */
export async function loadSheetContext(db: Db, signoffId: number) {
  return db.transaction(async (tx) => {
    const [locked] = await tx.select({ reelId: t.reels.id }).from(t.reels)
      .innerJoin(t.signoffs, eq(t.signoffs.reelId, t.reels.id))
      .where(eq(t.signoffs.id, signoffId)).for('update')
    if (!locked) return null
    const [head] = await tx.select({ signoff: t.signoffs, reel: t.reels, production: t.productions, team: t.teams })
      .from(t.signoffs)
      .innerJoin(t.reels, eq(t.reels.id, t.signoffs.reelId))
      .innerJoin(t.productions, eq(t.productions.id, t.reels.productionId))
      .innerJoin(t.teams, eq(t.teams.id, t.signoffs.teamId))
      .where(eq(t.signoffs.id, signoffId)).limit(1)
    if (!head) return null
    const rows = await loadSheetRows(tx, head.reel.id, { history: true })
    return { ...head, rows }
  })
}

/**
 * Where a reel stands on its way to a sheet, for the reel page and the production's reel list:
 * signed (with the result as signed and the state of its PDF), or open (with the result a
 * sign-off now would print and how many things block it).
 */
export interface ReelSheetState {
  signed: boolean
  overall: Overall
  blockers: number
  signerName: string | null
  signedAt: Date | null
  sheetStatus: 'pending' | 'ready' | 'failed' | null
}

export async function reelSheetState(db: DbOrTx, reelId: number): Promise<ReelSheetState> {
  const [rows, current] = await Promise.all([loadSheetRows(db, reelId), currentSignoff(db, reelId)])
  // A signed reel is read-only, so its live rows give the result that was signed.
  const summary = (current?.summary as SheetSummary | null) ?? summarise(rows)
  return {
    signed: !!current,
    overall: summary.overall,
    blockers: current ? 0 : signoffBlockers(rows).length,
    signerName: current?.signerName ?? null,
    signedAt: current?.signedAt ?? null,
    sheetStatus: current?.sheetStatus ?? null,
  }
}
