import { and, eq, isNull } from 'drizzle-orm'
import { z } from 'zod'
import { IdSchema } from '../../../../../shared/utils/validation'

const Params = z.object({ teamId: IdSchema, id: IdSchema })

/** Revokes a token at once (the next request with it answers 401): one's own, or any in the team for an owner. */
export default defineEventHandler(async (event) => {
  const { teamId, id } = await getValidatedRouterParams(event, Params.parse)
  const { user, role } = await requireTeamRole(event, teamId, 'view')
  const t = tables.apiTokens
  const [row] = await useDb().select().from(t).where(and(eq(t.id, id), eq(t.teamId, teamId))).limit(1)
  // Someone else's token is as invisible to a non-owner as a missing one.
  if (!row || (row.userId !== user.id && role !== 'owner')) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  await useDb().update(t).set({ revokedAt: new Date() }).where(and(eq(t.id, id), isNull(t.revokedAt)))
  await audit({ teamId, actorId: user.id, action: 'token.revoked', subjectType: 'api_token', subjectId: id, details: { name: row.name } })
  setResponseStatus(event, 204)
  return null
})
