// Which delivery spec measures a reel: the production's own (a team copy, editable by
// owners), else the default built-in. Returned with its version for the record.
import { eq } from 'drizzle-orm'
import { BUILTIN_SPECS, DEFAULT_SPEC_NAME, DeliverySpecSchema, builtinSpec, type DeliverySpec } from '../../shared/engine'
import type { Db, DbOrTx } from '../db/client'
import * as t from '../db/schema'

export interface ResolvedSpec {
  spec: DeliverySpec
  /** Team spec id, or null for a built-in used directly. */
  id: number | null
  version: number
}

export async function specForProduction(db: DbOrTx, productionId: number): Promise<ResolvedSpec> {
  const [row] = await db.select({ spec: t.deliverySpecs }).from(t.productions)
    .innerJoin(t.deliverySpecs, eq(t.deliverySpecs.id, t.productions.deliverySpecId))
    .where(eq(t.productions.id, productionId)).limit(1)
  if (row) return { spec: DeliverySpecSchema.parse(row.spec.body), id: row.spec.id, version: row.spec.version }
  return { spec: builtinSpec(DEFAULT_SPEC_NAME)!, id: null, version: 1 }
}

/** Copies the built-in specs into a new team (the team then edits its own copies). */
export async function copyBuiltinSpecs(db: Pick<Db, 'insert'>, teamId: number) {
  await db.insert(t.deliverySpecs).values(BUILTIN_SPECS.map((s) => ({ teamId, builtin: s.name, name: s.title, version: 1, body: s })))
}
