// Which delivery spec measures a reel: the production's own (a team copy, editable by
// owners), else the default built-in. Returned with its version for the record. And judging
// a production's measured frames again when its spec changes, from the stored level
// distributions, without decoding or measuring any picture again.
import { and, eq, inArray, isNull, sql } from 'drizzle-orm'
import { BUILTIN_SPECS, DEFAULT_SPEC_NAME, DeliverySpecSchema, builtinSpec, type DeliverySpec, type PackedLevels, type Verdict } from '../../shared/engine'
import { reasonsJson, type AnalysisJson } from '../../shared/utils/report'
import { judgeStored, summariseChanges, type VerdictChange } from '../../shared/utils/specs'
import type { Db, DbOrTx } from '../db/client'
import * as t from '../db/schema'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

export interface ResolvedSpec {
  spec: DeliverySpec
  /** Team spec id, or null for a built-in used directly. */
  id: number | null
  version: number
}

export async function specForProduction(db: Pick<DbOrTx, 'select'>, productionId: number): Promise<ResolvedSpec> {
  const [row] = await db.select({ spec: t.deliverySpecs }).from(t.productions)
    .innerJoin(t.deliverySpecs, eq(t.deliverySpecs.id, t.productions.deliverySpecId))
    .where(eq(t.productions.id, productionId)).limit(1)
  if (row) return { spec: DeliverySpecSchema.parse(row.spec.body), id: row.spec.id, version: row.spec.version }
  return { spec: builtinSpec(DEFAULT_SPEC_NAME)!, id: null, version: 1 }
}

/** Copies the built-in specs into a new team (read-only there; "copy and edit" makes the team's own). */
export async function copyBuiltinSpecs(db: Pick<Db, 'insert'>, teamId: number) {
  for (const s of BUILTIN_SPECS) await insertSpec(db, { teamId, builtin: s.name, spec: s, userId: null })
}

/** A new spec at version 1, with its first history row. */
export async function insertSpec(db: Pick<Db, 'insert'>, a: { teamId: number, builtin: string | null, spec: DeliverySpec, userId: number | null }) {
  const [row] = await db.insert(t.deliverySpecs).values({ teamId: a.teamId, builtin: a.builtin, name: a.spec.title, version: 1, body: a.spec }).$returningId()
  const id = row!.id
  await db.insert(t.deliverySpecVersions).values({ teamId: a.teamId, specId: id, version: 1, body: a.spec, changes: ['first version'], createdBy: a.userId })
  return id
}

interface PlannedFrame {
  analysisId: number
  frameId: number
  from: Verdict
  to: Verdict
  result: AnalysisJson
}

export interface RejudgePlan {
  frames: PlannedFrame[]
  changes: VerdictChange[]
  /** Frames kept as they are because their reel is signed off (its sheet holds what was signed). */
  skippedSigned: number
  /** Measured before level distributions were stored: cannot be judged again without measuring. */
  notStored: number
}

const CHUNK = 2000

// The driver hands json_extract's result over as text or, for a JSON-typed column, already parsed.
function jsonArray(v: unknown): number[] {
  const out = typeof v === 'string' ? JSON.parse(v) as unknown : v
  if (!Array.isArray(out)) throw new Error('stored histogram is not an array')
  return out as number[]
}

/**
 * Judges every measured frame of the productions against `spec` from what is stored. Frames of
 * signed-off reels are left alone. Nothing is written.
 */
export async function planRejudge(db: Pick<Db, 'select'>, teamId: number, productionIds: number[], spec: DeliverySpec): Promise<RejudgePlan> {
  const plan: RejudgePlan = { frames: [], changes: [], skippedSigned: 0, notStored: 0 }
  if (!productionIds.length) return plan
  const a = t.analyses
  // Only what judging needs: the small result, the Cb/Cr histograms and the packed levels.
  const rows = await db.select({
    id: a.id, frameId: a.frameId, verdict: a.verdict, result: a.result, signed: t.reels.signedAt,
    bins: sql<unknown>`json_extract(${a.histograms}, '$.bins')`,
    cb: sql<unknown>`json_extract(${a.histograms}, '$.cb')`,
    cr: sql<unknown>`json_extract(${a.histograms}, '$.cr')`,
    levels: a.levels,
  }).from(a)
    .innerJoin(t.frames, eq(t.frames.id, a.frameId))
    .innerJoin(t.reels, eq(t.reels.id, t.frames.reelId))
    .where(and(eq(a.teamId, teamId), eq(t.reels.teamId, teamId), inArray(t.reels.productionId, productionIds)))
  for (const r of rows) {
    if (r.signed) { plan.skippedSigned++; continue }
    if (!r.levels) { plan.notStored++; continue }
    const result = r.result as AnalysisJson
    const judged = judgeStored({
      result,
      // Parsed only if the spec has a Cb or Cr limit (measuredFromStored reads them lazily).
      histograms: { bins: Number(r.bins), get cb() { return jsonArray(r.cb) }, get cr() { return jsonArray(r.cr) } },
      levels: r.levels as PackedLevels,
    }, spec)
    const next = { ...result, spec: spec.name, verdict: judged.verdict, reasons: reasonsJson(judged.reasons) }
    plan.frames.push({ analysisId: r.id, frameId: r.frameId, from: r.verdict, to: judged.verdict, result: next })
    if (judged.verdict !== r.verdict) plan.changes.push({ frameId: r.frameId, from: r.verdict, to: judged.verdict })
  }
  return plan
}

/**
 * Writes a plan inside the caller's transaction: every judged frame records the new spec and
 * version, verdict and reasons; a decision on a frame whose verdict changed is kept and marked
 * for a second look.
 */
export async function applyRejudge(tx: Tx, teamId: number, plan: RejudgePlan, spec: DeliverySpec, version: number) {
  const a = t.analyses
  for (let i = 0; i < plan.frames.length; i += CHUNK) {
    const part = plan.frames.slice(i, i + CHUNK)
    const ids = part.map((f) => f.analysisId)
    const caseOf = (value: (f: PlannedFrame) => unknown) => sql.join([
      sql`case ${a.id}`,
      ...part.map((f) => sql`when ${f.analysisId} then ${value(f)}`),
      sql`end`,
    ], sql` `)
    await tx.update(a).set({
      specName: spec.name,
      specVersion: version,
      verdict: sql`${caseOf((f) => f.to)}`,
      result: sql`${caseOf((f) => JSON.stringify(f.result))}`,
    }).where(and(eq(a.teamId, teamId), inArray(a.id, ids)))
  }
  const changed = plan.changes.map((c) => c.frameId)
  for (let i = 0; i < changed.length; i += CHUNK) {
    const part = changed.slice(i, i + CHUNK)
    await tx.update(t.decisions).set({
      recheckAt: new Date(),
      recheckNote: `Verdict changed when judged against ${spec.title} v${version}: look again`.slice(0, 300),
    }).where(and(eq(t.decisions.teamId, teamId), inArray(t.decisions.frameId, part), isNull(t.decisions.recheckAt)))
    // A frame already marked keeps its first note; the latest spec is on the frame itself.
  }
  return summariseChanges(plan.changes)
}

/** The preview a person sees before applying. */
export function planSummary(plan: RejudgePlan) {
  const s = summariseChanges(plan.changes)
  return {
    judged: plan.frames.length,
    changed: plan.changes.length,
    text: s.text,
    transitions: s.transitions,
    skippedSigned: plan.skippedSigned,
    notStored: plan.notStored,
    frames: plan.changes.slice(0, 200),
  }
}

/**
 * Gives a team its copies of the built-in specs if it has none, and a first history row to any
 * spec that lacks one (teams made before specs had versions). Idempotent; the team row lock makes
 * parallel first visits insert once.
 */
export async function ensureTeamSpecs(db: Db, teamId: number) {
  const [have] = await db.select({ n: sql<number>`count(*)` }).from(t.deliverySpecs)
    .leftJoin(t.deliverySpecVersions, and(eq(t.deliverySpecVersions.specId, t.deliverySpecs.id), eq(t.deliverySpecVersions.version, t.deliverySpecs.version)))
    .where(and(eq(t.deliverySpecs.teamId, teamId), sql`(${t.deliverySpecs.builtin} is not null or ${t.deliverySpecVersions.id} is null)`))
  const builtins = await db.select({ id: t.deliverySpecs.id }).from(t.deliverySpecs).where(and(eq(t.deliverySpecs.teamId, teamId), sql`${t.deliverySpecs.builtin} is not null`))
  if (builtins.length >= BUILTIN_SPECS.length && Number(have?.n ?? 0) === builtins.length) return
  await db.transaction(async (tx) => {
    await tx.select({ id: t.teams.id }).from(t.teams).where(eq(t.teams.id, teamId)).for('update')
    const rows = await tx.select({ spec: t.deliverySpecs, v: t.deliverySpecVersions.id }).from(t.deliverySpecs)
      .leftJoin(t.deliverySpecVersions, and(eq(t.deliverySpecVersions.specId, t.deliverySpecs.id), eq(t.deliverySpecVersions.version, t.deliverySpecs.version)))
      .where(eq(t.deliverySpecs.teamId, teamId))
    const present = new Set(rows.map((r) => r.spec.builtin).filter(Boolean))
    for (const s of BUILTIN_SPECS) if (!present.has(s.name)) await insertSpec(tx, { teamId, builtin: s.name, spec: s, userId: null })
    for (const r of rows) {
      if (r.v === null) {
        await tx.insert(t.deliverySpecVersions).values({ teamId, specId: r.spec.id, version: r.spec.version, body: r.spec.body, changes: ['version as found when history began'], createdBy: null })
      }
    }
  })
}

/** A spec of the team, or 404 (another team's spec answers exactly as a missing one). */
export async function teamSpec(db: Pick<Db, 'select'>, teamId: number, specId: number, lock = false) {
  const q = db.select().from(t.deliverySpecs).where(and(eq(t.deliverySpecs.id, specId), eq(t.deliverySpecs.teamId, teamId))).limit(1)
  const [row] = lock ? await q.for('update') : await q
  return row
}
