// The analysis job: a plain function (tested by calling it with a fake job) that the
// entry point wires to a BullMQ worker. Idempotent: a second run of the same job finds the
// analysis row and writes nothing new.
import { and, eq, ne } from 'drizzle-orm'
import { UnrecoverableError } from 'bullmq'
import { AnalysisScratch, ENGINE_VERSION, analyseFrame, barsTolerancesFor, evaluateSpec, packLevels } from '../shared/engine'
import type { AnalyseJob } from '../shared/utils/queues'
import { analysisJson, histogramsJson } from '../shared/utils/report'
import { measureLineup, withLineup } from '../shared/utils/lineup'
import { matchAgainst, referenceFor } from '../server/lib/lineup'
import type { Db } from '../server/db/client'
import * as t from '../server/db/schema'
import { DecodeFileError } from '../server/lib/decode-file'
import { encodeFrameLines } from '../server/lib/frame-lines'
import { specForProduction } from '../server/lib/specs'
import { keys, type Storage } from '../server/lib/storage'
import { decodeStoredFrame, loadStoredFrame, type StoredFrame } from '../server/lib/stored-frame'
import { FRAME_IMAGE_KINDS } from '../shared/utils/frame-images'
import { renderFrameImages, renderViewingCopies, type FrameImage } from './lib/frame-images'

export interface AnalyseDeps {
  db: Db
  storage: Storage
}

export interface JobLike {
  data: AnalyseJob
  attemptsMade: number
  opts: { attempts?: number }
}

/** What the person sees when a frame fails: short, about their file, never a stack trace. */
function failReason(e: unknown) {
  const msg = (e as Error).message ?? String(e)
  if (e instanceof DecodeFileError) return `The file cannot be decoded: ${msg}`
  return msg.slice(0, 480)
}

const scratchPool: AnalysisScratch[] = []

async function storeImages(storage: Storage, frame: StoredFrame['frame'], images: Partial<Record<string, FrameImage>>, lines: Uint8Array) {
  // Every upload settles before this returns, failed or not: the line data may be a buffer
  // the next job reuses, and must not be read by a request still in flight.
  const settled = await Promise.allSettled([
    ...Object.entries(images).map(([kind, img]) => storage.put(keys.image(frame.teamId, frame.id, kind), img!.data, img!.contentType)),
    storage.put(keys.lines(frame.teamId, frame.id), lines, 'application/octet-stream'),
  ])
  const failed = settled.find((r) => r.status === 'rejected')
  if (failed) throw failed.reason
}

/** The viewing copy, thumbnail and line data of a frame analysed before they were stored. */
async function storeViews({ db, storage }: AnalyseDeps, stored: StoredFrame, had: readonly string[]) {
  const { input, matrix } = await decodeStoredFrame(storage, stored)
  const views = await renderViewingCopies(input, matrix)
  await storeImages(storage, stored.frame, views, encodeFrameLines(input))
  const images = FRAME_IMAGE_KINDS.filter((k) => had.includes(k) || k in views)
  await db.update(t.analyses).set({ images }).where(eq(t.analyses.frameId, stored.frame.id))
}

export async function processAnalyse(job: JobLike, deps: AnalyseDeps): Promise<{ status: 'done' | 'skipped' }> {
  const { db } = deps
  const { frameId } = job.data
  const stored = await loadStoredFrame(db, frameId)
  if (!stored) return { status: 'skipped' } // deleted since it was queued
  const { frame, reel } = stored
  const [done] = await db.select({ id: t.analyses.id, images: t.analyses.images, matrix: t.analyses.matrix, sourceRange: t.analyses.sourceRange })
    .from(t.analyses).where(eq(t.analyses.frameId, frameId)).limit(1)
  // Measured already with the reel's present settings: a second run writes nothing new.
  if (done && done.matrix === reel.matrix && done.sourceRange === reel.sourceRange) {
    // Analysed by a version that did not yet store the viewing copy and the line data.
    if (!done.images.includes('picture')) await storeViews(deps, stored, done.images)
    await db.update(t.frames).set({ status: 'done', failReason: null }).where(eq(t.frames.id, frameId))
    return { status: 'skipped' }
  }
  await db.update(t.frames).set({ status: 'analysing' }).where(and(eq(t.frames.id, frameId), ne(t.frames.status, 'done')))
  try {
    // The reel's matrix or range may change while a frame is measured: measure again with
    // the new settings rather than write a verdict they no longer give (at most a few times).
    for (let round = 0; ; round++) {
      const settings = round === 0 ? reel : await reelSettings(db, reel.id)
      if (!settings) return { status: 'skipped' }
      const written = await measureAndWrite(frame, { ...reel, ...settings }, deps)
      if (written || round >= 3) return { status: written ? 'done' : 'skipped' }
    }
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

async function reelSettings(db: Db, reelId: number) {
  const [r] = await db.select({ matrix: t.reels.matrix, sourceRange: t.reels.sourceRange }).from(t.reels).where(eq(t.reels.id, reelId)).limit(1)
  return r
}

type FrameRow = typeof t.frames.$inferSelect
type ReelRow = typeof t.reels.$inferSelect

/** One measurement with the given settings; false when the reel's settings changed meanwhile (nothing written). */
async function measureAndWrite(frame: FrameRow, reel: ReelRow, deps: AnalyseDeps): Promise<boolean> {
  const { db, storage } = deps
  const frameId = frame.id
  const started = performance.now()
  const { input } = await decodeStoredFrame(storage, { frame, reel })
  const { spec, version, id: specId } = await specForProduction(db, reel.productionId)
  // Density buffers, the drawn scope images and the line data are reused from job to job
  // (about 25 MB per 1080p frame otherwise allocated, and collected in full collections);
  // one scratch per job in flight, returned once everything drawn in it is stored.
  const scratch = scratchPool.pop() ?? new AnalysisScratch()
  let a: ReturnType<typeof analyseFrame>
  let images: Awaited<ReturnType<typeof renderFrameImages>>
  try {
    a = analyseFrame(input, { matrix: reel.matrix, spec, keepDensities: true, scratch })
    images = await renderFrameImages(input, a, reel.matrix, undefined, scratch)
    await storeImages(storage, frame, images, encodeFrameLines(input, (n) => scratch.raw('line data', n)))
  }
  finally {
    scratchPool.push(scratch)
  }
  const levels = packLevels(a.histograms.levels)
  const histograms = histogramsJson(a.histograms)
  const outShare = Math.max(a.shares.belowBlack, a.shares.aboveWhite, a.shares.compositeOut, a.shares.gamutOut)
  return db.transaction(async (tx) => {
    // Locked as the settings route locks it: a change lands either before this check or after the write.
    const [now] = await tx.select({ matrix: t.reels.matrix, sourceRange: t.reels.sourceRange }).from(t.reels).where(eq(t.reels.id, reel.id)).for('update')
    if (!now || now.matrix !== reel.matrix || now.sourceRange !== reel.sourceRange) return false
    // The production's spec may have changed (and its frames been re-judged) while this frame
    // was measured: lock the production as a re-judge does, and judge against the spec it has now.
    await tx.select({ id: t.productions.id }).from(t.productions).where(eq(t.productions.id, reel.productionId)).for('update')
    const current = await specForProduction(tx, reel.productionId)
    const judged = current.id === specId && current.version === version ? a : { ...a, ...evaluateSpec(a, current.spec) }
    // Bars check and blanking estimate beside the level analysis; their findings join its verdict.
    // Matched against the production's reference as it stands, read under lock so that a
    // reference changed meanwhile re-matches this frame after, never before, it is stored.
    const lineup = withLineup(analysisJson(judged, current.spec.name), measureLineup(input, { matrix: reel.matrix, spec: current.spec }))
    const json = matchAgainst(lineup, frameId, await referenceFor(tx, reel.productionId, true), barsTolerancesFor(current.spec))
    const row = {
      frameId, teamId: frame.teamId, engineVersion: ENGINE_VERSION, specName: current.spec.name, specVersion: current.version, verdict: json.verdict,
      lumaMinIre: a.lumaIre.min, lumaMaxIre: a.lumaIre.max, lumaMeanIre: a.lumaIre.mean,
      compMinIre: a.compositeIre.min, compMaxIre: a.compositeIre.max, outShare, matrix: reel.matrix, sourceRange: reel.sourceRange,
      result: json, histograms, levels, images: FRAME_IMAGE_KINDS.filter((k) => k in images), durationMs: Math.round(performance.now() - started),
    }
    // One row per frame: a racing second run with the same settings writes the same values.
    await tx.insert(t.analyses).values(row).onDuplicateKeyUpdate({ set: { ...row, updatedAt: new Date() } })
    await tx.update(t.frames).set({ status: 'done', failReason: null }).where(eq(t.frames.id, frameId))
    return true
  })
}
