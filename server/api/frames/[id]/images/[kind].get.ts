import { z } from 'zod'
import { IdSchema } from '../../../../../shared/utils/validation'
import { keys } from '../../../../lib/storage'

const KINDS = ['thumb', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] as const
const Params = z.object({ id: IdSchema, kind: z.enum(KINDS) })

/** A frame's thumbnail or scope image, streamed through the server so access stays checked. */
export default defineEventHandler(async (event) => {
  const { id, kind } = await getValidatedRouterParams(event, Params.parse)
  const { frame } = await requireFrame(event, id, 'view')
  if (frame.status !== 'done') throw createError({ statusCode: 404, statusMessage: 'Not analysed yet' })
  let bytes: Uint8Array
  try {
    bytes = await useStorageS3().get(keys.image(frame.teamId, frame.id, kind))
  } catch {
    throw createError({ statusCode: 404, statusMessage: 'Image not found' })
  }
  const jpeg = bytes[0] === 0xff && bytes[1] === 0xd8
  setResponseHeaders(event, { 'Content-Type': jpeg ? 'image/jpeg' : 'image/png', 'Cache-Control': 'private, max-age=86400', 'X-Content-Type-Options': 'nosniff' })
  return bytes
})
