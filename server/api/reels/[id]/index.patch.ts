import type { Queue } from 'bullmq'
import { eq, inArray } from 'drizzle-orm'
import { IdParams } from '../../../../shared/utils/validation'
import { MEASURE_SETTINGS, ReelPatchBody, dropFrameProblem } from '../../../../shared/utils/uploads'
import { QUEUE_ANALYSE, type AnalyseJob } from '../../../../shared/utils/queues'
import { requeueFrame } from '../../../lib/frames'
import { FRAME_RATES, labelAtRate, parseTimecode, timecodeFromFileName } from '../../../../shared/utils/timecode'
import type { Db } from '../../../db/client'

type Reel = typeof tables.reels.$inferSelect
type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

/**
 * Changes only the fields sent. A change of matrix or source range re-measures every frame
 * of the reel from its kept original: the old analyses go (their verdicts no longer hold),
 * the frames are queued again, and the worker writes new verdicts.
 */
export default defineEventHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, IdParams.parse)
  const { reel, user } = await requireReel(event, id, 'upload')
  const body = await readValidatedBody(event, ReelPatchBody.parse)
  const { updated, changes, frameIds } = await useDb().transaction(async (tx) => {
    // Locked like sign-off locks it: a sign-off cannot land between this check and the change.
    const [current] = await tx.select().from(tables.reels).where(eq(tables.reels.id, reel.id)).for('update')
    if (!current) throw createError({ statusCode: 404, statusMessage: 'Not found' })
    if (current.signedAt) {
      throw createError({ statusCode: 409, statusMessage: 'This reel is signed off and read-only; an owner can reopen it before its settings change' })
    }
    const changes: Partial<Reel> = {}
    for (const [k, v] of Object.entries(body) as [keyof typeof body, unknown][]) {
      if (v !== undefined && v !== current[k]) (changes as Record<string, unknown>)[k] = v
    }
    const next = { ...current, ...changes }
    // A rate without drop-frame labels turns drop-frame off rather than refusing the change.
    if (changes.frameRate !== undefined && body.dropFrame === undefined && dropFrameProblem(next.frameRate, next.dropFrame)) {
      changes.dropFrame = false
      next.dropFrame = false
    }
    const problem = dropFrameProblem(next.frameRate, next.dropFrame)
    if (problem) throw createError({ statusCode: 422, statusMessage: problem })
    if (!Object.keys(changes).length) return { updated: current, changes, frameIds: [] as number[] }
    await tx.update(tables.reels).set(changes).where(eq(tables.reels.id, reel.id))
    if ('frameRate' in changes || 'dropFrame' in changes) await relabelTimecodes(tx, reel.id, next)
    let frameIds: number[] = []
    if (MEASURE_SETTINGS.some((k) => k in changes)) {
      frameIds = (await tx.select({ id: tables.frames.id }).from(tables.frames).where(eq(tables.frames.reelId, reel.id))).map((r) => r.id)
      if (frameIds.length) {
        await tx.delete(tables.analyses).where(inArray(tables.analyses.frameId, frameIds))
        await tx.update(tables.frames).set({ status: 'queued', failReason: null, queuedAt: new Date() }).where(eq(tables.frames.reelId, reel.id))
      }
    }
    return { updated: next, changes, frameIds }
  })
  if (Object.keys(changes).length) {
    await audit({
      teamId: reel.teamId, actorId: user.id, action: 'reel.updated', subjectType: 'reel', subjectId: reel.id,
      details: { ...changes, ...(frameIds.length ? { remeasured: frameIds.length } : {}) },
    })
  }
  // After the commit, so a job never starts before the new settings are visible.
  const queue = useQueue(QUEUE_ANALYSE) as Queue<AnalyseJob>
  for (const frameId of frameIds) await requeueFrame(queue, frameId)
  return { ...updated, remeasured: frameIds.length }
})

/** The frames' timecodes labelled again at the reel's new rate (the reel's drop-frame choice rules). */
async function relabelTimecodes(tx: Tx, reelId: number, reel: Pick<Reel, 'frameRate' | 'dropFrame'>) {
  const rows = await tx.select({ id: tables.frames.id, name: tables.frames.name, timecode: tables.frames.timecode }).from(tables.frames).where(eq(tables.frames.reelId, reelId))
  const rate = reel.frameRate ? FRAME_RATES[reel.frameRate] : null
  for (const r of rows) {
    const tc = (r.timecode ? parseTimecode(r.timecode) : null) ?? timecodeFromFileName(r.name)
    const label = tc ? labelAtRate({ ...tc, dropFrame: false }, rate, reel.dropFrame) : null
    if (label !== r.timecode) await tx.update(tables.frames).set({ timecode: label }).where(eq(tables.frames.id, r.id))
  }
}
