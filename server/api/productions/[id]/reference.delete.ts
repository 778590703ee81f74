import { eq } from 'drizzle-orm'
import { barsTolerancesFor } from '../../../../shared/engine'
import { IdParams } from '../../../../shared/utils/validation'
import { referenceFor, rematchProduction } from '../../../lib/lineup'
import { specForProduction } from '../../../lib/specs'

/** Clears the production's reference source; the open reels' matches are removed with it. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, user } = await requireProduction(event, id, 'decide')
  const db = useDb()
  const { spec } = await specForProduction(db, production.id)
  return db.transaction(async (tx) => {
    const before = await referenceFor(tx, production.id, true)
    await tx.delete(tables.barsReferences).where(eq(tables.barsReferences.productionId, production.id))
    const rematched = await rematchProduction(tx, production.id, barsTolerancesFor(spec))
    if (before) await audit({ teamId: production.teamId, actorId: user.id, action: 'production.reference.cleared', subjectType: 'production', subjectId: production.id, details: { frameId: before.ref.frameId, rematched } }, tx)
    return { reference: null, rematched }
  })
})
