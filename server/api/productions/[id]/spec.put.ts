import { eq } from 'drizzle-orm'
import { DeliverySpecSchema } from '../../../../shared/engine'
import { ProductionSpecBody } from '../../../../shared/utils/specs'
import { IdParams } from '../../../../shared/utils/validation'
import { applyRejudge, ensureTeamSpecs, planRejudge, planSummary, specForProduction, teamSpec } from '../../../lib/specs'

/**
 * Chooses the production's delivery spec and judges its measured frames again against it.
 * Refused once any reel of it is signed off (the sheet records the spec it was signed against).
 * With `preview`, answers what would change and saves nothing.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, user } = await requireProduction(event, id, 'manageSpecs')
  const body = await readValidatedBody(event, ProductionSpecBody.parse)
  const teamId = production.teamId
  const db = useDb()
  await ensureTeamSpecs(db, teamId)
  const target = await teamSpec(db, teamId, body.specId)
  if (!target) throw createError({ statusCode: 400, statusMessage: 'Choose one of the team’s delivery specs' })
  const spec = DeliverySpecSchema.parse(target.body)
  const signedMessage = 'A reel of this production is signed off: reopen it before changing the spec'
  if (body.preview) {
    const reels = await db.select({ signedAt: tables.reels.signedAt }).from(tables.reels).where(eq(tables.reels.productionId, id))
    const plan = await planRejudge(db, teamId, [id], spec)
    return { preview: true, spec: { id: target.id, title: spec.title, version: target.version }, blocked: reels.some((r) => r.signedAt) ? signedMessage : null, ...planSummary(plan) }
  }
  return await db.transaction(async (tx) => {
    await tx.select({ id: tables.productions.id }).from(tables.productions).where(eq(tables.productions.id, id)).for('update')
    const reels = await tx.select({ signedAt: tables.reels.signedAt }).from(tables.reels).where(eq(tables.reels.productionId, id)).for('update')
    if (reels.some((r) => r.signedAt)) throw createError({ statusCode: 409, statusMessage: signedMessage })
    // Read again under the lock: the spec may have gained a version since the check above.
    const locked = await teamSpec(tx, teamId, body.specId)
    if (!locked) throw createError({ statusCode: 400, statusMessage: 'Choose one of the team’s delivery specs' })
    const lockedSpec = DeliverySpecSchema.parse(locked.body)
    const before = await specForProduction(tx, id)
    await tx.update(tables.productions).set({ deliverySpecId: locked.id }).where(eq(tables.productions.id, id))
    const plan = await planRejudge(tx, teamId, [id], lockedSpec)
    await applyRejudge(tx, teamId, plan, lockedSpec, locked.version)
    const summary = planSummary(plan)
    await audit({
      teamId, actorId: user.id, action: 'production.spec_changed', subjectType: 'production', subjectId: id,
      details: { from: { id: before.id, name: before.spec.name, version: before.version }, to: { id: locked.id, name: lockedSpec.name, version: locked.version }, rejudge: { judged: summary.judged, changed: summary.changed, text: summary.text } },
    }, tx)
    return { preview: false, spec: { id: locked.id, title: lockedSpec.title, version: locked.version }, ...summary }
  })
})
