import type { Db } from '../db/client'

type Tx = Pick<Db, 'insert'>

/** Appends to the team's audit log (inside the caller's transaction when one is given). */
export async function audit(
  entry: { teamId: number | null; actorId: number | null; action: string; subjectType: string; subjectId?: number | null; details?: unknown },
  tx: Tx = useDb(),
) {
  await tx.insert(tables.auditLog).values({ ...entry, subjectId: entry.subjectId ?? null, details: entry.details ?? null })
}
