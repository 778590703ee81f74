import { randomBytes } from 'node:crypto'
import { TeamParams } from '../../../../../shared/utils/validation'
import { API_TOKEN_PREFIX, CreateTokenBody, roleWithin } from '../../../../../shared/utils/tokens'
import { ROLE_LABELS } from '../../../../../shared/utils/roles'

/** Makes a personal API token for this team. The token is in this answer only; the database keeps its SHA-256. */
export default defineEventHandler(async (event) => {
  const { teamId } = await getValidatedRouterParams(event, TeamParams.parse)
  // A token cannot make tokens: only a person signed in with their password can.
  await requireSessionUser(event)
  const { user, role: myRole } = await requireTeamRole(event, teamId, 'view')
  const { name, role, expiresInDays } = await readValidatedBody(event, CreateTokenBody.parse)
  if (!roleWithin(role, myRole)) {
    throw createError({ statusCode: 403, statusMessage: `A token can have at most your own role (${ROLE_LABELS[myRole]}), not ${ROLE_LABELS[role]}` })
  }
  const token = API_TOKEN_PREFIX + randomBytes(32).toString('base64url')
  const expiresAt = expiresInDays ? new Date(Date.now() + expiresInDays * 86_400_000) : null
  const id = firstId(await useDb().insert(tables.apiTokens).values({ teamId, userId: user.id, name, role, tokenHash: hashToken(token), expiresAt }).$returningId())
  await audit({ teamId, actorId: user.id, action: 'token.created', subjectType: 'api_token', subjectId: id, details: { name, role, expiresAt } })
  setResponseStatus(event, 201)
  return { id, name, role, expiresAt, token }
})
