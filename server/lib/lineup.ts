// The production's reference source and the matching of every other source against it, for
// the routes and the worker alike (no Nuxt auto-imports here).
import { and, asc, eq, isNull } from 'drizzle-orm'
import type { BarsTolerances } from '../../shared/engine'
import { applyMatch } from '../../shared/utils/lineup'
import type { LineupAnalysisJson, MatchReference, BarsJson } from '../../shared/utils/lineup'
import type { Db } from '../db/client'
import * as t from '../db/schema'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

export interface ReferenceSource { ref: MatchReference, bars: BarsJson }

/**
 * The production's reference and its bars. With `lock`, the reference row is read FOR UPDATE
 * (on a missing row InnoDB locks the gap of the unique key), so a worker storing a match and a
 * reviewer changing the reference take turns instead of leaving a stale match behind.
 */
export async function referenceFor(db: Db | Tx, productionId: number, lock = false): Promise<ReferenceSource | null> {
  const q = db.select({ frameId: t.barsReferences.frameId }).from(t.barsReferences).where(eq(t.barsReferences.productionId, productionId))
  const [row] = lock ? await q.for('update') : await q
  if (!row) return null
  const [r] = await db.select({ frameName: t.frames.name, reelId: t.reels.id, reelName: t.reels.name, result: t.analyses.result })
    .from(t.frames).innerJoin(t.reels, eq(t.reels.id, t.frames.reelId)).innerJoin(t.analyses, eq(t.analyses.frameId, t.frames.id))
    .where(eq(t.frames.id, row.frameId)).limit(1)
  const bars = (r?.result as LineupAnalysisJson | undefined)?.bars
  if (!r || !bars?.recognised) return null
  return { ref: { frameId: row.frameId, frameName: r.frameName, reelId: r.reelId, reelName: r.reelName }, bars }
}

/** A frame's stored JSON matched against the reference (none for the reference itself). */
export function matchAgainst(json: LineupAnalysisJson, frameId: number, reference: ReferenceSource | null, tol: BarsTolerances): LineupAnalysisJson {
  if (!json.bars) return json
  return applyMatch(json, reference && reference.ref.frameId !== frameId ? reference : null, tol)
}

/**
 * Re-matches every analysed bars frame of the production's open reels against the current
 * reference; frames of signed reels keep what was signed. Returns how many rows changed.
 */
export async function rematchProduction(tx: Tx, productionId: number, tol: BarsTolerances): Promise<number> {
  const reference = await referenceFor(tx, productionId)
  const rows = await tx.select({ id: t.analyses.id, frameId: t.analyses.frameId, result: t.analyses.result, verdict: t.analyses.verdict })
    .from(t.analyses).innerJoin(t.frames, eq(t.frames.id, t.analyses.frameId)).innerJoin(t.reels, eq(t.reels.id, t.frames.reelId))
    .where(and(eq(t.reels.productionId, productionId), isNull(t.reels.signedAt)))
  let changed = 0
  for (const row of rows) {
    const json = row.result as LineupAnalysisJson
    if (!json.bars?.recognised && !json.match) continue
    const next = matchAgainst(json, row.frameId, reference, tol)
    if (JSON.stringify(next.match) === JSON.stringify(json.match) && next.verdict === row.verdict) continue
    await tx.update(t.analyses).set({ result: next, verdict: next.verdict }).where(eq(t.analyses.id, row.id))
    changed++
  }
  return changed
}

/** Per reel (source): its first bars frame, that frame's figures and its match. */
export async function matchingTable(db: Db, productionId: number) {
  const rows = await db.select({
    reelId: t.reels.id, reelName: t.reels.name, sourceLabel: t.reels.sourceLabel,
    frameId: t.frames.id, frameName: t.frames.name, seq: t.frames.seq, result: t.analyses.result, verdict: t.analyses.verdict,
  }).from(t.reels)
    .innerJoin(t.frames, eq(t.frames.reelId, t.reels.id))
    .innerJoin(t.analyses, eq(t.analyses.frameId, t.frames.id))
    .where(eq(t.reels.productionId, productionId))
    .orderBy(asc(t.reels.createdAt), asc(t.reels.id), asc(t.frames.seq))
  const bySource = new Map<number, ReturnType<typeof sourceRow>>()
  function sourceRow(r: typeof rows[number]) {
    const json = r.result as LineupAnalysisJson
    return {
      reelId: r.reelId, reelName: r.reelName, sourceLabel: r.sourceLabel, frameId: r.frameId, frameName: r.frameName,
      verdict: r.verdict, bars: json.bars, match: json.match ?? null,
    }
  }
  for (const r of rows) {
    if (bySource.has(r.reelId)) continue
    if (!(r.result as LineupAnalysisJson).bars?.recognised) continue
    bySource.set(r.reelId, sourceRow(r))
  }
  return [...bySource.values()]
}
