import { eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { can } from '../../../../shared/utils/roles'
import { currentSignoff, loadSheetRows, signoffHistory } from '../../../lib/sheet'
import { signoffBlockers, summarise } from '../../../lib/sheet-rules'
import { specForProduction } from '../../../lib/specs'
import { clipBlockers, loadSheetClips } from '../../../lib/sheet-clips'

/**
 * What the sheet page shows: the rows and summary as they stand, what (if anything) blocks a
 * sign-off, the standing sign-off with its sheet's state, and the earlier ones.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, role } = await requireReel(event, id, 'view')
  const db = useDb()
  const [production] = await db.select({ id: tables.productions.id, name: tables.productions.name, client: tables.productions.client, teamId: tables.productions.teamId })
    .from(tables.productions).where(eq(tables.productions.id, reel.productionId))
  // The foreign keys keep these rows; a miss means the reel went while this request ran.
  if (!production) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const rows = await loadSheetRows(db, reel.id)
  const current = await currentSignoff(db, reel.id)
  const { spec, version } = await specForProduction(db, reel.productionId)
  const history = await signoffHistory(db, reel.id)
  const clips = await loadSheetClips(db, reel.id)
  return {
    reel: { id: reel.id, name: reel.name, sourceLabel: reel.sourceLabel, sourceRange: reel.sourceRange, matrix: reel.matrix, signedAt: reel.signedAt },
    production,
    role,
    can: { signOff: can(role, 'signOff'), reopen: can(role, 'reopen'), download: can(role, 'downloadSheet') },
    // While signed, the sheet shows the spec as it was signed; otherwise the one a sign-off would record.
    spec: current
      ? { name: current.specName, title: current.specTitle, version: current.specVersion, description: current.specBody.description, limits: current.specBody.limits }
      : { name: spec.name, title: spec.title, version, description: spec.description, limits: spec.limits },
    blockers: reel.signedAt ? [] : [...signoffBlockers(rows), ...clipBlockers(clips)],
    clips,
    summary: summarise(rows),
    rows: rows.map((r) => ({ ...r, thumbUrl: r.status === 'done' ? `/api/frames/${r.frameId}/images/thumb` : null })),
    signoff: current
      ? { id: current.id, signerName: current.signerName, signedAt: current.signedAt, engineVersion: current.engineVersion, sheetStatus: current.sheetStatus, sheetError: current.sheetError }
      : null,
    // Earlier sign-offs only: each was superseded by a reopen.
    history: history.flatMap((h) => (h.supersededAt ? [{ ...h, supersededAt: h.supersededAt }] : [])),
  }
})
