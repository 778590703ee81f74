import { and, eq } from 'drizzle-orm'
import { barsTolerancesFor } from '../../../../shared/engine'
import type { LineupAnalysisJson } from '../../../../shared/utils/lineup'
import { IdParams } from '../../../../shared/utils/validation'
import { ReferenceBody } from '../../../../shared/utils/reference'
import { referenceFor, rematchProduction } from '../../../lib/lineup'
import { specForProduction } from '../../../lib/specs'

/**
 * A reviewer names the production's reference source: an analysed frame of one of its reels
 * that was recognised as bars. Every analysed bars frame of the production's open reels is
 * matched again against it in the same transaction.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, user } = await requireProduction(event, id, 'decide')
  const { frameId } = await readValidatedBody(event, ReferenceBody.parse)
  const db = useDb()
  const { spec } = await specForProduction(db, production.id)
  const tol = barsTolerancesFor(spec)
  const result = await db.transaction(async (tx) => {
    // Lock the production's reference row (or its gap): workers storing a match wait for this.
    await referenceFor(tx, production.id, true)
    const [f] = await tx.select({ frame: tables.frames, result: tables.analyses.result }).from(tables.frames)
      .innerJoin(tables.reels, eq(tables.reels.id, tables.frames.reelId))
      .leftJoin(tables.analyses, eq(tables.analyses.frameId, tables.frames.id))
      .where(and(eq(tables.frames.id, frameId), eq(tables.reels.productionId, production.id), eq(tables.frames.teamId, production.teamId)))
      .limit(1)
    if (!f) throw createError({ statusCode: 404, statusMessage: 'That frame is not in this production' })
    const bars = (f.result as LineupAnalysisJson | null)?.bars
    if (!f.result) throw createError({ statusCode: 409, statusMessage: 'That frame is not analysed yet; pick it once its analysis is done' })
    if (!bars?.recognised) {
      throw createError({ statusCode: 422, statusMessage: `That frame was not recognised as colour bars${bars?.notes?.length ? ` (${bars.notes.join('; ')})` : ''}; pick a bars frame` })
    }
    await tx.insert(tables.barsReferences).values({ teamId: production.teamId, productionId: production.id, frameId, setBy: user.id })
      .onDuplicateKeyUpdate({ set: { frameId, setBy: user.id } })
    const rematched = await rematchProduction(tx, production.id, tol)
    await audit({ teamId: production.teamId, actorId: user.id, action: 'production.reference.set', subjectType: 'production', subjectId: production.id, details: { frameId, rematched } }, tx)
    return { rematched, reference: await referenceFor(tx, production.id) }
  })
  return result
})
