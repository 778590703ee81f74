import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { linePlot } from '../../../../../shared/engine'
import { lineJson } from '../../../../../shared/utils/report'
import { IdSchema } from '../../../../../shared/utils/validation'
import { decodeBytes } from '../../../../../workers/lib/decode-file'
import { UPLOAD_LIMITS } from '../../../../../shared/utils/uploads'

const Params = z.object({ id: IdSchema, n: z.coerce.number().int().min(0).max(100_000) })

/** The line plot of line n (0 = top), computed by the engine from the original. */
export default defineEventHandler(async (event) => {
  const { id, n } = await getValidatedRouterParams(event, Params.parse)
  const { frame } = await requireFrame(event, id, 'view')
  if (n >= frame.height) throw createError({ statusCode: 400, statusMessage: `Line ${n} is outside the picture (lines 0–${frame.height - 1})` })
  // A frame the worker could not decode has nothing to plot: say why instead of failing again.
  if (frame.status === 'failed') throw createError({ statusCode: 409, statusMessage: `This frame could not be measured: ${frame.failReason ?? 'its file could not be decoded'}` })
  const [reel] = await useDb().select().from(tables.reels).where(eq(tables.reels.id, frame.reelId))
  const bytes = await useStorageS3().get(frame.objectKey)
  const raw = frame.format === 'uyvy' || frame.format === 'v210' ? frame.format : undefined
  let input: Awaited<ReturnType<typeof decodeBytes>>
  try {
    input = await decodeBytes(bytes, { range: reel!.sourceRange, raw, width: frame.width, height: frame.height, maxPixels: UPLOAD_LIMITS.maxPixels })
  } catch (e) {
    throw createError({ statusCode: 409, statusMessage: `This frame's file could not be decoded: ${(e as Error).message}` })
  }
  setResponseHeader(event, 'Cache-Control', 'private, max-age=300')
  return { frameId: frame.id, width: frame.width, height: frame.height, matrix: reel!.matrix, line: lineJson(linePlot(input, n, { matrix: reel!.matrix })) }
})
