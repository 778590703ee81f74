import { eq } from 'drizzle-orm'
import sharp from 'sharp'
import { z } from 'zod'
import { IdSchema } from '../../../../../shared/utils/validation'
import { UPLOAD_LIMITS } from '../../../../../shared/utils/uploads'
import { keys } from '../../../../lib/storage'
import { decodeBytes } from '../../../../../workers/lib/decode-file'
import { renderPicture } from '../../../../../workers/lib/preview'

const KINDS = ['thumb', 'picture', 'overlay', 'waveform-luma', 'waveform-flat', 'waveform-rgb', 'vectorscope'] as const
const Params = z.object({ id: IdSchema, kind: z.enum(KINDS) })

/** Width of the viewing copy: sharp on a large screen, a fraction of a 4K original's bytes. */
const PICTURE_WIDTH = 1600

/**
 * The viewing copy of the picture is made on first request and kept beside the scope
 * images: most frames are only ever seen in the table, so the worker does not spend its
 * time on it.
 */
async function makePicture(frame: { reelId: number; objectKey: string; format: string; width: number; height: number }) {
  const [reel] = await useDb().select().from(tables.reels).where(eq(tables.reels.id, frame.reelId))
  const bytes = await useStorageS3().get(frame.objectKey)
  const raw = frame.format === 'uyvy' || frame.format === 'v210' ? frame.format : undefined
  const input = await decodeBytes(bytes, { range: reel!.sourceRange, raw, width: frame.width, height: frame.height, maxPixels: UPLOAD_LIMITS.maxPixels })
  const rgba = renderPicture(input, reel!.matrix, PICTURE_WIDTH * 2)
  const out = await sharp(Buffer.from(rgba.data.buffer, rgba.data.byteOffset, rgba.data.byteLength), { raw: { width: rgba.width, height: rgba.height, channels: 4 } })
    .removeAlpha().resize({ width: PICTURE_WIDTH, withoutEnlargement: true }).jpeg({ quality: 88 }).toBuffer()
  return new Uint8Array(out)
}

/** A frame's picture, thumbnail or scope image, streamed through the server so access stays checked. */
export default defineEventHandler(async (event) => {
  const { id, kind } = await getValidatedRouterParams(event, Params.parse)
  const { frame } = await requireFrame(event, id, 'view')
  if (frame.status !== 'done') throw createError({ statusCode: 404, statusMessage: 'Not analysed yet' })
  const storage = useStorageS3()
  const key = keys.image(frame.teamId, frame.id, kind)
  let bytes: Uint8Array
  try {
    bytes = await storage.get(key)
  } catch {
    if (kind !== 'picture') throw createError({ statusCode: 404, statusMessage: 'Image not found' })
    bytes = await makePicture(frame)
    await storage.put(key, bytes, 'image/jpeg')
  }
  const jpeg = bytes[0] === 0xff && bytes[1] === 0xd8
  setResponseHeaders(event, { 'Content-Type': jpeg ? 'image/jpeg' : 'image/png', 'Cache-Control': 'private, max-age=86400', 'X-Content-Type-Options': 'nosniff' })
  return bytes
})
