// Seeds the demo team, its users (one per role) and a production. Idempotent: running it
// again changes nothing that is already there (and never resets a changed password).
import { and, eq } from 'drizzle-orm'
import { hashPassword } from './password'
import { createDb } from './client'
import * as t from './schema'
import { DEMO_PRODUCTION, DEMO_TEAM, DEMO_USERS } from './demo'
import { copyBuiltinSpecs } from '../lib/specs'

const { db, pool } = createDb(process.env.NUXT_DATABASE_URL ?? '', 2)
try {
  let [team] = await db.select().from(t.teams).where(eq(t.teams.name, DEMO_TEAM)).limit(1)
  if (!team) {
    const [{ id }] = await db.insert(t.teams).values({ name: DEMO_TEAM }).$returningId()
    ;[team] = await db.select().from(t.teams).where(eq(t.teams.id, id))
  }
  let [spec] = await db.select().from(t.deliverySpecs).where(eq(t.deliverySpecs.teamId, team!.id)).orderBy(t.deliverySpecs.id).limit(1)
  if (!spec) {
    await copyBuiltinSpecs(db, team!.id)
    ;[spec] = await db.select().from(t.deliverySpecs).where(eq(t.deliverySpecs.teamId, team!.id)).orderBy(t.deliverySpecs.id).limit(1)
  }
  let ownerId = 0
  for (const u of DEMO_USERS) {
    let [user] = await db.select().from(t.users).where(eq(t.users.email, u.email)).limit(1)
    if (!user) {
      const [{ id }] = await db.insert(t.users).values({ email: u.email, name: u.name, passwordHash: await hashPassword(u.password) }).$returningId()
      ;[user] = await db.select().from(t.users).where(eq(t.users.id, id))
    }
    if (u.role === 'owner') ownerId = user!.id
    await db.insert(t.memberships).values({ teamId: team!.id, userId: user!.id, role: u.role }).onDuplicateKeyUpdate({ set: { userId: user!.id } })
  }
  const [prod] = await db.select().from(t.productions)
    .where(and(eq(t.productions.teamId, team!.id), eq(t.productions.name, DEMO_PRODUCTION.name))).limit(1)
  if (!prod) {
    await db.insert(t.productions).values({ ...DEMO_PRODUCTION, teamId: team!.id, createdBy: ownerId, deliverySpecId: spec!.id })
  }
  console.log(`[seed] demo team "${DEMO_TEAM}" ready`)
} finally {
  await pool.end()
}
