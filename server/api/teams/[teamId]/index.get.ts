import { eq } from 'drizzle-orm'
import { TeamParams } from '../../../../shared/utils/validation'

export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  const { role } = await requireTeamRole(event, teamId, 'view')
  const [team] = await useDb().select({ id: tables.teams.id, name: tables.teams.name }).from(tables.teams).where(eq(tables.teams.id, teamId))
  return { ...team, role }
})
