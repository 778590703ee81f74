import { and, eq, inArray } from 'drizzle-orm'
import { describeSpecChanges, SpecVersionBody } from '../../../../shared/utils/specs'
import { DeliverySpecSchema } from '../../../../shared/engine'
import { IdParams } from '../../../../shared/utils/validation'
import { applyRejudge, planRejudge, planSummary, teamSpec } from '../../../lib/specs'

/**
 * Saves a new version of a team spec and judges again every measured frame of the productions
 * using it (frames of signed-off reels keep the version they were signed against). With
 * `preview`, answers what would change and saves nothing.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { row, user } = await requireTeamRow(event, tables.deliverySpecs, id, 'manageSpecs')
  const body = await readValidatedBody(event, SpecVersionBody.parse)
  const teamId = row.teamId
  if (row.builtin) throw createError({ statusCode: 409, statusMessage: 'Built-in specs are read-only: copy it to make the team’s own' })
  const db = useDb()
  const usedBy = async (q: Pick<typeof db, 'select'>) => (await q.select({ id: tables.productions.id }).from(tables.productions)
    .where(and(eq(tables.productions.teamId, teamId), eq(tables.productions.deliverySpecId, id)))).map((p) => p.id)
  if (body.preview) {
    const plan = await planRejudge(db, teamId, await usedBy(db), body.spec)
    return { preview: true, version: row.version + 1, changes: describeSpecChanges(DeliverySpecSchema.parse(row.body), body.spec), ...planSummary(plan) }
  }
  return await db.transaction(async (tx) => {
    const current = await teamSpec(tx, teamId, id, true)
    if (!current) throw createError({ statusCode: 404, statusMessage: 'Not found' })
    if (current.version !== body.baseVersion) {
      throw createError({ statusCode: 409, statusMessage: `This spec was saved as version ${current.version} meanwhile: reload it and make your change again` })
    }
    const before = DeliverySpecSchema.parse(current.body)
    if (before.name !== body.spec.name) throw createError({ statusCode: 400, statusMessage: 'A spec keeps its short name across versions; copy it to make another' })
    const changes = describeSpecChanges(before, body.spec)
    if (!changes.length) throw createError({ statusCode: 400, statusMessage: 'Nothing changed: this version would equal the current one' })
    const version = current.version + 1
    // A locking read sees the latest committed choice of spec (a plain read would see this
    // transaction's snapshot and could miss a production switched to this spec meanwhile). The
    // productions and their reels stay locked, so no frame is stored and no reel signed off
    // between judging and writing.
    const productionIds = (await tx.select({ id: tables.productions.id }).from(tables.productions)
      .where(and(eq(tables.productions.teamId, teamId), eq(tables.productions.deliverySpecId, id))).for('update')).map((p) => p.id)
    if (productionIds.length) {
      await tx.select({ id: tables.reels.id }).from(tables.reels).where(inArray(tables.reels.productionId, productionIds)).for('update')
    }
    const plan = await planRejudge(tx, teamId, productionIds, body.spec)
    const summary = await applyRejudge(tx, teamId, plan, body.spec, version)
    await tx.update(tables.deliverySpecs).set({ version, body: body.spec, name: body.spec.title }).where(eq(tables.deliverySpecs.id, id))
    const rejudge = { judged: plan.frames.length, changed: plan.changes.length, text: summary.text, transitions: summary.transitions, skippedSigned: plan.skippedSigned }
    await tx.insert(tables.deliverySpecVersions).values({ teamId, specId: id, version, body: body.spec, changes, rejudge, createdBy: user.id })
    await audit({ teamId, actorId: user.id, action: 'spec.versioned', subjectType: 'delivery_spec', subjectId: id, details: { version, changes, rejudge } }, tx)
    return { preview: false, version, changes, ...planSummary(plan) }
  })
})
