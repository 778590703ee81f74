// The images the analyse job stores for a frame (workers/lib/frame-images.ts), read back with
// sharp: kinds, formats and sizes, and that what is stored is what the engine measured.
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, MASK_DEFAULT_WIDTH, MASK_HIGH, MASK_LOW, PALETTE } from '../../../shared/engine/index'
import type { FrameInput } from '../../../shared/engine/index'
import { renderFrameImages } from '../../../workers/lib/frame-images'
import { FRAME_IMAGE_KINDS, PICTURE_WIDTH, THUMB_WIDTH } from '../../../shared/utils/frame-images'
import { solidRgb8, uyvyRow } from '../engine/helpers'

const decode = async (bytes: Uint8Array) => sharp(bytes).raw().toBuffer({ resolveWithObject: true })

/** The overlay layer's opaque pixels as "x,y:bit" (1 above, 2 below), from its colours. */
async function marks(png: Uint8Array): Promise<{ width: number, height: number, marks: string[] }> {
  const { data, info } = await decode(png)
  expect(info.channels).toBe(4)
  const out: string[] = []
  for (let i = 0; i < info.width * info.height; i++) {
    const a = data[i * 4 + 3]!
    if (a === 0) continue
    expect(a).toBe(255)
    const c = [...data.subarray(i * 4, i * 4 + 3)]
    const bit = c.every((v, k) => v === PALETTE.overlayHigh[k]) ? MASK_HIGH : c.every((v, k) => v === PALETTE.overlayLow[k]) ? MASK_LOW : 0
    out.push(`${i % info.width},${Math.floor(i / info.width)}:${bit}`)
  }
  return { width: info.width, height: info.height, marks: out }
}

describe('frame images', () => {
  it('stores a JPEG thumbnail, the overlay as a transparent layer of the engine\'s marks, and the scopes', async () => {
    // Studio-range grey (code 126) with one super-white pixel, code 250 > white 235 (BT.601
    // Table 3 — memory).
    const W = 1920; const H = 1080
    const frame = solidRgb8(126, 126, 126, W, H, 'studio')
    ;(frame as Extract<FrameInput, { kind: 'rgb' }>).data.fill(250, (532 * W + 1000) * 3, (532 * W + 1000) * 3 + 3)
    const spec = builtinSpec('digital-studio')!
    const a = analyseFrame(frame, { spec, keepDensities: true })
    const images = await renderFrameImages(frame, a, '601')
    expect(Object.keys(images).sort()).toEqual([...FRAME_IMAGE_KINDS].sort())

    expect(images.thumb.contentType).toBe('image/jpeg')
    const thumb = await sharp(images.thumb.data).metadata()
    // Computed: 1080 · 320/1920 = 180.
    expect([thumb.format, thumb.width, thumb.height]).toEqual(['jpeg', THUMB_WIDTH, 180])
    // Studio-range grey 126 shows as (126 − 16)/219 · 255 ≈ 128 (computed), give or take JPEG.
    const { data: tp } = await decode(images.thumb.data)
    expect(Math.abs(tp[0]! - 128)).toBeLessThanOrEqual(2)

    // The viewing copy: computed, 1080 · 1600/1920 = 900.
    expect(images.picture.contentType).toBe('image/jpeg')
    const picture = await sharp(images.picture.data).metadata()
    expect([picture.format, picture.width, picture.height]).toEqual(['jpeg', PICTURE_WIDTH, 900])
    const { data: pp } = await decode(images.picture.data)
    expect(Math.abs(pp[0]! - 128)).toBeLessThanOrEqual(2)

    for (const kind of FRAME_IMAGE_KINDS.filter(k => k !== 'thumb' && k !== 'picture')) {
      expect(images[kind].contentType).toBe('image/png')
      expect((await sharp(images[kind].data).metadata()).format).toBe('png')
    }
    // One mark, at the hot pixel's block: (⌊1000·1280/1920⌋, ⌊532·720/1080⌋) = (666, 354), computed.
    const o = await marks(images.overlay.data)
    expect([o.width, o.height]).toEqual([MASK_DEFAULT_WIDTH, 720])
    expect(o.marks).toEqual([`666,354:${MASK_HIGH}`])
    // A layer of one mark is a few hundred bytes, not a picture's megabytes.
    expect(images.overlay.data.length).toBeLessThan(20_000)
  })

  it('marks above and below on full-range 8-bit stills, where the verdict counts them', async () => {
    // Full-range grey (128) with one 100 % yellow pixel, composite +130.8 IRE above the 120 IRE
    // limit, and one 100 % blue, −23.3 IRE below −20 IRE (SMPTE EG 1 100 % bars — memory; computed).
    const W = 1920; const H = 1080
    const frame = solidRgb8(128, 128, 128, W, H)
    const d = (frame as Extract<FrameInput, { kind: 'rgb' }>).data
    d.set([255, 255, 0], (532 * W + 1000) * 3)
    d.set([0, 0, 255], (1079 * W + 7) * 3)
    const spec = builtinSpec('ntsc-setup')!
    const a = analyseFrame(frame, { spec, keepDensities: true })
    expect(a.reasons.map(r => r.limit).sort()).toEqual(['composite-max', 'composite-min'])
    const steps: string[] = []
    const images = await renderFrameImages(frame, a, '601', async (name, f) => { steps.push(name); return f() })
    expect(steps).toContain('overlay layer')
    // Computed blocks: (⌊1000·2/3⌋, ⌊532·2/3⌋) = (666, 354) above, (⌊7·2/3⌋, ⌊1079·2/3⌋) = (4, 719) below.
    expect((await marks(images.overlay.data)).marks).toEqual([`666,354:${MASK_HIGH}`, `4,719:${MASK_LOW}`])
    // The thumbnail is the grey picture.
    const { data: tp } = await decode(images.thumb.data)
    expect(Math.abs(tp[0]! - 128)).toBeLessThanOrEqual(2)
  })

  it('makes the thumbnail of a raw Y\'CbCr capture through the engine\'s row decoding, as a JPEG', async () => {
    // 720×486 UYVY, the ITU-R BT.601 raster: 320 wide → 486 · 320/720 = 216 rows.
    const pairs = Array.from({ length: 360 }, (_, k): [number, number, number, number] => [16 + (k % 200), 16 + (k % 200), 128, 128])
    const frame = uyvyRow(pairs, 486)
    const spec = builtinSpec('ntsc-setup')!
    const images = await renderFrameImages(frame, analyseFrame(frame, { spec, keepDensities: true }), '601')
    const thumb = await sharp(images.thumb.data).metadata()
    expect([images.thumb.contentType, thumb.format, thumb.width, thumb.height]).toEqual(['image/jpeg', 'jpeg', 320, 216])
    const overlay = await sharp(images.overlay.data).metadata()
    // Narrower than the overlay width: kept at the frame's own size.
    expect([overlay.width, overlay.height]).toEqual([720, 486])
  })

  it('refuses an analysis made without the scope data rather than storing empty scopes', async () => {
    const frame = solidRgb8(128, 128, 128)
    const spec = builtinSpec('ntsc-setup')!
    await expect(renderFrameImages(frame, analyseFrame(frame, { spec }), '601')).rejects.toThrow(/keepDensities/)
  })
})
