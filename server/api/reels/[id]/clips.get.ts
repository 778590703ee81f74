import { and, desc, eq, ne } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'

/** The reel's clips, newest first, with progress for those being measured. */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel } = await requireReel(event, id, 'view')
  const rows = await useDb().select().from(tables.clips)
    .where(and(eq(tables.clips.reelId, reel.id), eq(tables.clips.teamId, reel.teamId), ne(tables.clips.status, 'uploading')))
    .orderBy(desc(tables.clips.id)).limit(200)
  return { clips: await Promise.all(rows.map(async (c) => ({ ...clipView(c), progress: await clipProgress(c) }))) }
})
