import { and, eq, isNull } from 'drizzle-orm'
import { z } from 'zod'
import { IdSchema } from '../../../../../shared/utils/validation'

const Params = z.object({ teamId: IdSchema, id: IdSchema })

export default defineEventHandler(async (event) => {
  const { teamId, id } = await getValidatedRouterParams(event, Params.parse)
  const { user } = await requireTeamRole(event, teamId, 'manageTeam')
  const [res] = await useDb().update(tables.invitations).set({ revokedAt: new Date() })
    .where(and(eq(tables.invitations.id, id), eq(tables.invitations.teamId, teamId), isNull(tables.invitations.acceptedAt), isNull(tables.invitations.revokedAt)))
  if (!res.affectedRows) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  await audit({ teamId, actorId: user.id, action: 'invitation.revoked', subjectType: 'invitation', subjectId: id })
  setResponseStatus(event, 204)
  return null
})
