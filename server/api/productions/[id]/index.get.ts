import { asc, eq } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { production, role } = await requireProduction(event, id, 'view')
  const reels = await useDb().select().from(tables.reels)
    .where(eq(tables.reels.productionId, production.id)).orderBy(asc(tables.reels.createdAt))
  return { ...production, role, reels }
})
