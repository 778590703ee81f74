// Test data written straight into the test database (the API is what is under test,
// not the way the data got there). Every call makes new, uniquely named rows.
import { randomBytes } from 'node:crypto'
import { createDb, firstId } from '../../server/db/client'
import { hashPassword } from '../../server/seed/password'
import * as t from '../../server/db/schema'
import type { Role } from '../../shared/utils/roles'
import { DATABASE_URL } from './env'

let handle: ReturnType<typeof createDb> | undefined
export function db() {
  handle ??= createDb(DATABASE_URL(), 4)
  return handle.db
}
export async function closeDb() {
  await handle?.pool.end()
  handle = undefined
}

export const uid = () => randomBytes(5).toString('hex')
export const PASSWORD = 'correct horse battery 9'
let passwordHash: string | undefined

export async function createUser(label = 'user') {
  passwordHash ??= await hashPassword(PASSWORD)
  const email = `${label}-${uid()}@test.example`
  const id = firstId(await db().insert(t.users).values({ email, name: `Test ${label}`, passwordHash }).$returningId())
  return { id, email, password: PASSWORD }
}

export async function createTeam(name = 'Team') {
  const id = firstId(await db().insert(t.teams).values({ name: `${name} ${uid()}` }).$returningId())
  return id
}

export async function addMember(teamId: number, userId: number, role: Role) {
  await db().insert(t.memberships).values({ teamId, userId, role })
}

export async function createProduction(teamId: number, name = 'Production') {
  const id = firstId(await db().insert(t.productions).values({ teamId, name: `${name} ${uid()}` }).$returningId())
  return id
}

/** A team with one user in each role, and a production. */
export async function createTeamWithRoles() {
  const teamId = await createTeam()
  const users = {} as Record<Role, Awaited<ReturnType<typeof createUser>>>
  for (const role of ['owner', 'editor', 'reviewer', 'producer'] as const) {
    users[role] = await createUser(role)
    await addMember(teamId, users[role].id, role)
  }
  const productionId = await createProduction(teamId)
  return { teamId, users, productionId }
}
