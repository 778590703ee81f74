import { eq } from 'drizzle-orm'
import { ENGINE_VERSION } from '../../../../shared/engine'
import { IdParams } from '../../../../shared/utils/validation'
import { QUEUE_SHEET, sheetJobId, type SheetJob } from '../../../../shared/utils/queues'
import { producersOf, signoffMailText } from '../../../lib/notices'
import { loadSheetRows } from '../../../lib/sheet'
import { signoffBlockers, summarise } from '../../../lib/sheet-rules'
import { clipBlockers, loadSheetClips } from '../../../lib/sheet-clips'
import { specForProduction } from '../../../lib/specs'

/**
 * Signs a reel off: every frame measured (or rejected), every failing frame decided. Records
 * the spec as it is now and the engine version, locks the reel, queues the sheet and tells
 * the team's producers. Refusals name every frame that stands in the way.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'signOff')
  const db = useDb()
  const out = await db.transaction(async (tx) => {
    // The reel row lock orders this against uploads (which take it too) and a second sign-off.
    const [locked] = await tx.select().from(tables.reels).where(eq(tables.reels.id, reel.id)).for('update')
    if (!locked) throw createError({ statusCode: 404, statusMessage: 'Not found' })
    if (locked.signedAt) {
      const [by] = locked.signedBy ? await tx.select({ name: tables.users.name }).from(tables.users).where(eq(tables.users.id, locked.signedBy)) : []
      throw createError({ statusCode: 409, statusMessage: `This reel is already signed off${by ? ` by ${by.name}` : ''} (${locked.signedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC)` })
    }
    const rows = await loadSheetRows(tx, reel.id)
    const blockers = [...signoffBlockers(rows), ...clipBlockers(await loadSheetClips(tx, reel.id))]
    if (blockers.length) {
      throw createError({ statusCode: 409, statusMessage: `This reel cannot be signed off yet: ${blockers.map((b) => b.message).join('; ')}`, data: { blockers } })
    }
    const { spec, version } = await specForProduction(tx, reel.productionId)
    const [production] = await tx.select().from(tables.productions).where(eq(tables.productions.id, reel.productionId))
    const signedAt = new Date()
    const summary = summarise(rows)
    const [inserted] = await tx.insert(tables.signoffs).values({
      teamId: reel.teamId, reelId: reel.id, signedBy: user.id, signerName: user.name, signedAt,
      specName: spec.name, specTitle: spec.title, specVersion: version, specBody: spec, engineVersion: ENGINE_VERSION, summary,
    }).$returningId()
    const signoffId = inserted!.id
    await tx.update(tables.reels).set({ signedAt, signedBy: user.id }).where(eq(tables.reels.id, reel.id))
    await audit({
      teamId: reel.teamId, actorId: user.id, action: 'reel.signed_off', subjectType: 'reel', subjectId: reel.id,
      details: { signoffId, spec: spec.name, specVersion: version, engineVersion: ENGINE_VERSION, overall: summary.overall, frames: rows.length },
    }, tx)
    // Queued before the commit: if Redis is down the whole sign-off is refused (503) rather
    // than left without its sheet or its mails. A job that outruns the commit is retried.
    await enqueue(QUEUE_SHEET, 'sheet', { signoffId } satisfies SheetJob, { jobId: sheetJobId(signoffId) })
    const producers = await producersOf(tx, reel.teamId)
    const link = appUrl(`/sheets/${reel.id}`)
    for (const p of producers) {
      await queueMail(mailWithLink({
        ...signoffMailText(p, {
          signerName: user.name, reelName: reel.name, productionName: production!.name,
          summary, frames: rows.length, specTitle: spec.title, specVersion: version,
        }),
        link,
      }))
    }
    return { signoffId, signedAt, summary, notified: producers.length }
  })
  return { ...out, sheetUrl: `/sheets/${reel.id}`, signedBy: { id: user.id, name: user.name } }
})
