import { z } from 'zod'
import { FRAME_IMAGE_KINDS } from '../../../../../shared/utils/frame-images'
import { IdSchema } from '../../../../../shared/utils/validation'
import { keys } from '../../../../lib/storage'

const Params = z.object({ id: IdSchema, kind: z.enum(FRAME_IMAGE_KINDS) })

/**
 * A frame's picture, thumbnail or scope image as the worker stored it, streamed through the
 * server so access stays checked.
 */
export default defineEventHandler(async (event) => {
  const { id, kind } = await getValidatedRouterParams(event, Params.parse)
  const { frame } = await requireFrame(event, id, 'view')
  if (frame.status !== 'done') throw createError({ statusCode: 404, statusMessage: 'Not analysed yet' })
  let bytes: Uint8Array
  try {
    bytes = await useStorageS3().get(keys.image(frame.teamId, frame.id, kind))
  }
  catch {
    throw createError({ statusCode: 404, statusMessage: 'Image not found' })
  }
  const jpeg = bytes[0] === 0xff && bytes[1] === 0xd8
  setResponseHeaders(event, { 'Content-Type': jpeg ? 'image/jpeg' : 'image/png', 'Cache-Control': 'private, max-age=86400', 'X-Content-Type-Options': 'nosniff' })
  return bytes
})
