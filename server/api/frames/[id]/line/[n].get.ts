import { eq } from 'drizzle-orm'
import { z } from 'zod'
import { linePlot } from '../../../../../shared/engine'
import { lineJson } from '../../../../../shared/utils/report'
import { IdSchema } from '../../../../../shared/utils/validation'
import { readFrameLine } from '../../../../lib/frame-lines'
import { keys } from '../../../../lib/storage'

const Params = z.object({ id: IdSchema, n: z.coerce.number().int().min(0).max(100_000) })

/**
 * The line plot of line n (0 = top), computed by the engine from that line's codes in the
 * line data the worker stored: the server reads one line, never the whole original.
 */
export default defineEventHandler(async (event) => {
  const { id, n } = await getValidatedRouterParams(event, Params.parse)
  const { frame } = await requireFrame(event, id, 'view')
  if (n >= frame.height) throw createError({ statusCode: 400, statusMessage: `Line ${n} is outside the picture (lines 0–${frame.height - 1})` })
  // A frame the worker could not decode has nothing to plot: say why instead of failing again.
  if (frame.status === 'failed') throw createError({ statusCode: 409, statusMessage: `This frame could not be measured: ${frame.failReason ?? 'its file could not be decoded'}` })
  if (frame.status !== 'done') throw createError({ statusCode: 404, statusMessage: 'Not analysed yet' })
  const [reel] = await useDb().select({ matrix: tables.reels.matrix }).from(tables.reels).where(eq(tables.reels.id, frame.reelId))
  let row
  try {
    row = await readFrameLine(useStorageS3(), keys.lines(frame.teamId, frame.id), n)
  }
  catch (e) {
    if ((e as { name?: string }).name === 'NoSuchKey') throw createError({ statusCode: 404, statusMessage: 'The line data of this frame is being made; try again in a minute' })
    throw e
  }
  const line = { ...linePlot(row, 0, { matrix: reel!.matrix }), index: n }
  setResponseHeader(event, 'Cache-Control', 'private, max-age=300')
  return { frameId: frame.id, width: frame.width, height: frame.height, matrix: reel!.matrix, line: lineJson(line) }
})
