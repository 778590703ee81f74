// The analysis job: a plain function (tested by calling it with a fake job) that the
// entry point wires to a BullMQ worker. Idempotent: a second run of the same job finds the
// analysis row and writes nothing new.
import { and, eq, ne } from 'drizzle-orm'
import { UnrecoverableError } from 'bullmq'
import { AnalysisScratch, ENGINE_VERSION, analyseFrame, barsTolerancesFor } from '../shared/engine'
import type { AnalyseJob } from '../shared/utils/queues'
import { analysisJson } from '../shared/utils/report'
import { measureLineup, withLineup } from '../shared/utils/lineup'
import { matchAgainst, referenceFor } from '../server/lib/lineup'
import type { Db } from '../server/db/client'
import * as t from '../server/db/schema'
import { specForProduction } from '../server/lib/specs'
import { keys, type Storage } from '../server/lib/storage'
import { DecodeFileError, decodeBytes } from './lib/decode-file'
import { renderFrameImages } from './lib/frame-images'
import { UPLOAD_LIMITS } from '../shared/utils/uploads'

export interface AnalyseDeps {
  db: Db
  storage: Storage
}

export interface JobLike {
  data: AnalyseJob
  attemptsMade: number
  opts: { attempts?: number }
}

export { IMAGE_KINDS, type ImageKind } from './lib/frame-images'

/** What the person sees when a frame fails: short, about their file, never a stack trace. */
function failReason(e: unknown) {
  const msg = (e as Error).message ?? String(e)
  if (e instanceof DecodeFileError) return `The file cannot be decoded: ${msg}`
  return msg.slice(0, 480)
}

const scratchPool: AnalysisScratch[] = []

export async function processAnalyse(job: JobLike, deps: AnalyseDeps): Promise<{ status: 'done' | 'skipped' }> {
  const { db, storage } = deps
  const { frameId } = job.data
  const [row] = await db.select({ frame: t.frames, reel: t.reels }).from(t.frames)
    .innerJoin(t.reels, eq(t.reels.id, t.frames.reelId)).where(eq(t.frames.id, frameId)).limit(1)
  if (!row) return { status: 'skipped' } // deleted since it was queued
  const { frame, reel } = row
  const [done] = await db.select({ id: t.analyses.id }).from(t.analyses).where(eq(t.analyses.frameId, frameId)).limit(1)
  if (done) {
    await db.update(t.frames).set({ status: 'done', failReason: null }).where(eq(t.frames.id, frameId))
    return { status: 'skipped' }
  }
  await db.update(t.frames).set({ status: 'analysing' }).where(and(eq(t.frames.id, frameId), ne(t.frames.status, 'done')))

  const started = performance.now()
  try {
    const bytes = await storage.get(frame.objectKey)
    const isRaw = frame.format === 'uyvy' || frame.format === 'v210'
    const input = await decodeBytes(bytes, {
      range: reel.sourceRange, raw: isRaw ? (frame.format as 'uyvy' | 'v210') : undefined,
      width: frame.width, height: frame.height, maxPixels: UPLOAD_LIMITS.maxPixels,
    })
    const { spec, version } = await specForProduction(db, reel.productionId)
    // Density buffers are reused from job to job (8 MB per 1080p frame otherwise allocated
    // and collected); one scratch per job in flight, returned once its images are drawn.
    const scratch = scratchPool.pop() ?? new AnalysisScratch()
    let a: ReturnType<typeof analyseFrame>
    let images: Awaited<ReturnType<typeof renderFrameImages>>
    try {
      a = analyseFrame(input, { matrix: reel.matrix, spec, keepDensities: true, scratch })
      images = await renderFrameImages(input, a, reel.matrix)
    }
    finally {
      scratchPool.push(scratch)
    }
    await Promise.all(Object.entries(images).map(([kind, img]) =>
      storage.put(keys.image(frame.teamId, frame.id, kind), img.data, img.contentType)))
    // Bars check and blanking estimate beside the level analysis; their findings join its verdict.
    const lineup = withLineup(analysisJson(a, spec.name), measureLineup(input, { matrix: reel.matrix, spec }))
    const h = a.histograms
    const histograms = {
      bins: h.bins, rgbCoding: h.rgbCoding,
      y: [...h.y], cb: [...h.cb], cr: [...h.cr], r: [...h.r], g: [...h.g], b: [...h.b],
    }
    const outShare = Math.max(a.shares.belowBlack, a.shares.aboveWhite, a.shares.compositeOut, a.shares.gamutOut)
    await db.transaction(async (tx) => {
      // Matched against the production's reference as it stands, read under lock so that a
      // reference changed meanwhile re-matches this frame after, never before, it is stored.
      const json = matchAgainst(lineup, frameId, await referenceFor(tx, reel.productionId, true), barsTolerancesFor(spec))
      // The unique key on frame_id turns a racing second run into a no-op.
      await tx.insert(t.analyses).values({
        frameId, teamId: frame.teamId, engineVersion: ENGINE_VERSION, specName: spec.name, specVersion: version, verdict: json.verdict,
        lumaMinIre: a.lumaIre.min, lumaMaxIre: a.lumaIre.max, lumaMeanIre: a.lumaIre.mean,
        compMinIre: a.compositeIre.min, compMaxIre: a.compositeIre.max, outShare,
        result: json, histograms, images: Object.keys(images), durationMs: Math.round(performance.now() - started),
      }).onDuplicateKeyUpdate({ set: { frameId } })
      await tx.update(t.frames).set({ status: 'done', failReason: null }).where(eq(t.frames.id, frameId))
    })
    return { status: 'done' }
  } catch (e) {
    const permanent = e instanceof DecodeFileError || e instanceof UnrecoverableError
    const lastAttempt = job.attemptsMade + 1 >= (job.opts.attempts ?? 1)
    if (permanent || lastAttempt) {
      await db.update(t.frames).set({ status: 'failed', failReason: failReason(e) }).where(eq(t.frames.id, frameId))
      // No retry can mend a file that cannot be decoded.
      if (permanent) throw new UnrecoverableError(failReason(e))
    } else {
      await db.update(t.frames).set({ status: 'queued', queuedAt: new Date() }).where(eq(t.frames.id, frameId))
    }
    throw e
  }
}
