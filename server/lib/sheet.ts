// Reading what a pass/fail sheet shows, for the routes and the worker alike (no Nuxt
// auto-imports here). The rows are read live: a signed reel is read-only, so while a
// sign-off stands its frames, analyses and decisions cannot change under it.
import { and, asc, desc, eq, isNull } from 'drizzle-orm'
import type { Db } from '../db/client'
import * as t from '../db/schema'
import type { AnalysisJson } from '../../shared/utils/report'
import { lineupLines } from '../../shared/utils/lineup'
import type { LineupAnalysisJson } from '../../shared/utils/lineup'
import type { SheetReason, SheetRow } from './sheet-rules'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
export type SignoffRow = typeof t.signoffs.$inferSelect

/** Object keys from ids only, beside the reel's other objects; one pair per sign-off. */
export const sheetKeys = {
  pdf: (teamId: number, reelId: number, signoffId: number) => `teams/${teamId}/reels/${reelId}/sheets/${signoffId}.pdf`,
  csv: (teamId: number, reelId: number, signoffId: number) => `teams/${teamId}/reels/${reelId}/sheets/${signoffId}.csv`,
}

export async function loadSheetRows(db: Db | Tx, reelId: number): Promise<SheetRow[]> {
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
  return rows.map(({ result, ...r }) => ({
    ...r,
    // An analysis row can outlive a status flip; the sheet trusts the row, not the flag.
    verdict: r.status === 'done' ? r.verdict : null,
    note: r.note ?? '',
    reasons: ((result as AnalysisJson | null)?.reasons ?? []).map((x): SheetReason => ({ limit: x.limit, message: x.message, severity: x.severity })),
    lineup: r.status === 'done' ? lineupLines(result as LineupAnalysisJson | null) : [],
  }))
}

/** The standing sign-off of a reel (not superseded), if any. */
export async function currentSignoff(db: Db | Tx, reelId: number): Promise<SignoffRow | undefined> {
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
    const rows = await loadSheetRows(tx, head.reel.id)
    return { ...head, rows }
  })
}

export type SheetContext = NonNullable<Awaited<ReturnType<typeof loadSheetContext>>>
