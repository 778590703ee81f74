import { and, eq, inArray } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { CLIP_ACTIVE } from '../../../../shared/utils/clips'

/** Stops a clip's measurement: its chunks see the change within about a second and stop. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { clip, user } = await requireClip(event, id, 'upload')
  const db = useDb()
  const [res] = await db.update(tables.clips).set({ status: 'cancelled', failReason: 'Cancelled' })
    .where(and(eq(tables.clips.id, clip.id), inArray(tables.clips.status, [...CLIP_ACTIVE])))
  if (res.affectedRows !== 1) {
    throw createError({ statusCode: 409, statusMessage: `This clip is ${clip.status}; only a clip being measured can be cancelled` })
  }
  await audit({ teamId: clip.teamId, actorId: user.id, action: 'clip.cancel', subjectType: 'clip', subjectId: clip.id, details: { name: clip.name } })
  const [row] = await db.select().from(tables.clips).where(eq(tables.clips.id, clip.id)).limit(1)
  return { clip: clipView(row!) }
})
