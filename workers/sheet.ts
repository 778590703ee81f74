// The sheet job: a plain function (tested by calling it with a fake job) that the entry
// point wires to a BullMQ worker. It writes the PDF and the CSV of one sign-off to S3 and
// marks the sign-off ready. Idempotent: a sign-off whose sheet is ready is left alone.
import { and, eq } from 'drizzle-orm'
import { UnrecoverableError } from 'bullmq'
import { stringify } from 'csv-stringify/sync'
import { DeliverySpecSchema } from '../shared/engine'
import type { SheetJob } from '../shared/utils/queues'
import type { Db } from '../server/db/client'
import * as t from '../server/db/schema'
import { loadSheetContext, sheetKeys } from '../server/lib/sheet'
import { loadSheetClips } from '../server/lib/sheet-clips'
import { CSV_COLUMNS, CSV_NUMBER_COLUMNS, csvRecord, summarise, type SheetRow } from '../server/lib/sheet-rules'
import { keys, type Storage } from '../server/lib/storage'
import { renderSheetPdf, type ScopeKind } from './sheet-pdf'
import { sheetPicture } from './lib/sheet-picture'
import { UPLOAD_LIMITS } from '../shared/utils/uploads'

export interface SheetDeps {
  db: Db
  storage: Pick<Storage, 'get' | 'put'>
}

export interface SheetJobLike {
  data: SheetJob
  attemptsMade: number
  opts: { attempts?: number }
}

/** The CSV beside the PDF: a header row, then one row per frame in index order (RFC 4180, UTF-8 with BOM for spreadsheets). */
export function sheetCsv(rows: SheetRow[]): string {
  return `\uFEFF${stringify(rows.map(csvRecord), {
    header: true, columns: [...CSV_COLUMNS], record_delimiter: 'windows',
    // Every text cell in quotes, so no delimiter or line break inside one is ever read as a new cell.
    cast: { string: (value, ctx) => (ctx.header || CSV_NUMBER_COLUMNS.has(String(ctx.column)) ? value : { value, quoted: true, quoted_empty: true }) },
  })}`
}

export async function processSheet(job: SheetJobLike, deps: SheetDeps): Promise<{ status: 'done' | 'skipped' }> {
  const { db, storage } = deps
  const { signoffId } = job.data
  try {
    const ctx = await loadSheetContext(db, signoffId)
    // The sign-off commits in the same transaction that queues this job; a job that outruns
    // the commit finds nothing yet and is retried with backoff.
    if (!ctx) throw new Error(`sign-off ${signoffId} not found (not committed yet, or deleted with its reel)`)
    const { signoff, reel, production, team, rows } = ctx
    if (signoff.sheetStatus === 'ready') return { status: 'skipped' }
    if (signoff.supersededAt) {
      // After a reopen the frames may have changed: a sheet made now would not be the one signed.
      await db.update(t.signoffs).set({ sheetStatus: 'failed', sheetError: 'The reel was reopened before this sheet was made' }).where(eq(t.signoffs.id, signoffId))
      return { status: 'skipped' }
    }
    const spec = DeliverySpecSchema.parse(signoff.specBody)
    const summary = summarise(rows)
    const image = async (frameId: number, kind: 'thumb' | ScopeKind) => {
      try {
        return await storage.get(keys.image(reel.teamId, frameId, kind))
      } catch {
        return null
      }
    }
    const files = new Map((await db.select({ id: t.frames.id, objectKey: t.frames.objectKey, format: t.frames.format, width: t.frames.width, height: t.frames.height })
      .from(t.frames).where(eq(t.frames.reelId, reel.id))).map((f) => [f.id, f]))
    const picture = async (frameId: number) => {
      const f = files.get(frameId)
      if (!f) return null
      try {
        return await sheetPicture({
          frame: f, reel, maxPixels: UPLOAD_LIMITS.maxPixels,
          viewing: async () => (await storage.get(keys.image(reel.teamId, frameId, 'picture')).catch(() => null)),
          original: () => storage.get(f.objectKey),
          overlay: async () => (await storage.get(keys.image(reel.teamId, frameId, 'overlay')).catch(() => null)),
        })
      } catch {
        return null
      }
    }
    const pdf = await renderSheetPdf({
      production, team, reel, spec, rows, summary,
      signoff: {
        id: signoff.id, signerName: signoff.signerName, signedAt: signoff.signedAt, specVersion: signoff.specVersion,
        engineVersion: signoff.engineVersion,
      },
      images: { thumb: (id) => image(id, 'thumb'), scope: image, picture },
      clips: await loadSheetClips(db, reel.id),
    })
    const pdfKey = sheetKeys.pdf(reel.teamId, reel.id, signoff.id)
    const csvKey = sheetKeys.csv(reel.teamId, reel.id, signoff.id)
    await storage.put(pdfKey, pdf, 'application/pdf')
    await storage.put(csvKey, new TextEncoder().encode(sheetCsv(rows)), 'text/csv; charset=utf-8')
    await db.update(t.signoffs).set({ sheetStatus: 'ready', sheetError: null, pdfKey, csvKey, summary })
      .where(and(eq(t.signoffs.id, signoffId), eq(t.signoffs.sheetStatus, 'pending')))
    return { status: 'done' }
  } catch (e) {
    const lastAttempt = job.attemptsMade + 1 >= (job.opts.attempts ?? 1)
    if (lastAttempt || e instanceof UnrecoverableError) {
      await db.update(t.signoffs).set({ sheetStatus: 'failed', sheetError: `The sheet could not be made: ${(e as Error).message}`.slice(0, 480) })
        .where(and(eq(t.signoffs.id, signoffId), eq(t.signoffs.sheetStatus, 'pending')))
    }
    throw e
  }
}
