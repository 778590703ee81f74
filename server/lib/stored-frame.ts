// "A stored frame into engine input", in one place: the frame's reel (its source range and
// matrix), the original from S3, the raw format it was uploaded as, and the decode. The
// worker calls this; the web server never decodes originals (it serves what the worker
// stored from them: the viewing copy, the scope images and the line data).
import { eq } from 'drizzle-orm'
import type { FrameInput, MatrixName } from '../../shared/engine/types'
import { RAW_FORMATS, UPLOAD_LIMITS } from '../../shared/utils/uploads'
import type { DbOrTx } from '../db/client'
import * as t from '../db/schema'
import type { FrameRow, ReelRow } from '../../shared/types/db'
import { decodeBytes, type RawKind } from './decode-file'
import type { Storage } from './storage'

export interface StoredFrame {
  frame: FrameRow
  reel: ReelRow
}

/** The frame and its reel, or null when the frame has been deleted. */
export async function loadStoredFrame(db: DbOrTx, frameId: number): Promise<StoredFrame | null> {
  const [row] = await db.select({ frame: t.frames, reel: t.reels }).from(t.frames)
    .innerJoin(t.reels, eq(t.reels.id, t.frames.reelId)).where(eq(t.frames.id, frameId)).limit(1)
  return row ?? null
}

const isRaw = (format: string): format is RawKind => (RAW_FORMATS as readonly string[]).includes(format)

/** The original decoded as the engine reads it; throws DecodeFileError for a file it cannot read. */
export async function decodeStoredFrame(storage: Pick<Storage, 'get'>, { frame, reel }: StoredFrame): Promise<{ input: FrameInput, matrix: MatrixName }> {
  const bytes = await storage.get(frame.objectKey)
  const input = await decodeBytes(bytes, {
    range: reel.sourceRange, raw: isRaw(frame.format) ? frame.format : undefined,
    width: frame.width, height: frame.height, maxPixels: UPLOAD_LIMITS.maxPixels,
  })
  return { input, matrix: reel.matrix }
}
