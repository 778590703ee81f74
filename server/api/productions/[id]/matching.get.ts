import { barsTolerancesFor, BARS_TOLERANCE_SOURCE } from '../../../../shared/engine'
import { IdParams } from '../../../../shared/utils/validation'
import { matchingTable, referenceFor } from '../../../lib/lineup'
import { specForProduction } from '../../../lib/specs'

/** The production's reference source and every source's bars and match against it, at a glance. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, role } = await requireProduction(event, id, 'view')
  const db = useDb()
  const { spec } = await specForProduction(db, production.id)
  const [reference, sources] = await Promise.all([referenceFor(db, production.id), matchingTable(db, production.id)])
  return { role, reference, sources, tolerances: barsTolerancesFor(spec), toleranceSource: BARS_TOLERANCE_SOURCE, spec: spec.name }
})
