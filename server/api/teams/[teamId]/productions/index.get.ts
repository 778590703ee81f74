import { count, desc, eq } from 'drizzle-orm'
import { TeamParams } from '../../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  await requireTeamRole(event, teamId, 'view')
  return useDb()
    .select({
      id: tables.productions.id,
      name: tables.productions.name,
      client: tables.productions.client,
      createdAt: tables.productions.createdAt,
      updatedAt: tables.productions.updatedAt,
      reelCount: count(tables.reels.id),
    })
    .from(tables.productions)
    .leftJoin(tables.reels, eq(tables.reels.productionId, tables.productions.id))
    .where(eq(tables.productions.teamId, teamId))
    .groupBy(tables.productions.id)
    .orderBy(desc(tables.productions.updatedAt))
})
