// The images the analyse job stores for a frame (workers/lib/frame-images.ts), read back with
// sharp: kinds, formats and sizes, and that what is stored is what the renderers drew.
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, PALETTE, renderRangeOverlay } from '../../../shared/engine/index'
import type { FrameInput } from '../../../shared/engine/index'
import { IMAGE_KINDS, OVERLAY_WIDTH, renderFrameImages, THUMB_WIDTH } from '../../../workers/lib/frame-images'
import { solidRgb8, uyvyRow } from '../engine/helpers'

const decode = async (bytes: Uint8Array) => sharp(bytes).raw().toBuffer({ resolveWithObject: true })

describe('frame images', () => {
  it('stores a JPEG thumbnail, the overlay at its display width and the scopes, opaque and lossless', async () => {
    // Studio-range grey (code 126) with one super-white pixel, code 250 > white 235 (BT.601
    // Table 3, REFERENCE.md §1).
    const W = 1920; const H = 1080
    const frame = solidRgb8(126, 126, 126, W, H, 'studio')
    ;(frame as Extract<FrameInput, { kind: 'rgb' }>).data.fill(250, (532 * W + 1000) * 3, (532 * W + 1000) * 3 + 3)
    const spec = builtinSpec('digital-studio')!
    const a = analyseFrame(frame, { spec, keepDensities: true })
    const images = await renderFrameImages(frame, a, spec, '601')
    expect(Object.keys(images)).toEqual([...IMAGE_KINDS])

    expect(images.thumb.contentType).toBe('image/jpeg')
    const thumb = await sharp(images.thumb.data).metadata()
    // Computed: 1080 · 320/1920 = 180.
    expect([thumb.format, thumb.width, thumb.height]).toEqual(['jpeg', THUMB_WIDTH, 180])

    for (const kind of IMAGE_KINDS.filter(k => k !== 'thumb')) {
      expect(images[kind].contentType).toBe('image/png')
      const meta = await sharp(images[kind].data).metadata()
      expect([kind, meta.format, meta.channels]).toEqual([kind, 'png', 3])
    }
    // The stored overlay is, pixel for pixel, the renderer's picture at 1280 wide with the hot
    // pixel's block — (666, 354), computed as ⌊1000·1280/1920⌋, ⌊532·720/1080⌋ — marked.
    const { data, info } = await decode(images.overlay.data)
    expect([info.width, info.height]).toEqual([OVERLAY_WIDTH, 720])
    const drawn = renderRangeOverlay(frame, spec, { maxWidth: OVERLAY_WIDTH })
    let differ = 0
    for (let i = 0; i < info.width * info.height; i++) {
      for (let c = 0; c < 3; c++) if (data[i * 3 + c] !== drawn.data[i * 4 + c]) differ++
    }
    expect(differ).toBe(0)
    const at = (354 * OVERLAY_WIDTH + 666) * 3
    expect([...data.subarray(at, at + 3)]).toEqual([...PALETTE.overlayHigh])
  })

  it('paints the engine\'s mask on a libvips-scaled picture for full-range 8-bit stills, marking the blocks its own tests would', async () => {
    // Full-range grey (128) with one 100 % yellow pixel, composite +130.8 IRE above the 120 IRE
    // limit, and one 100 % blue, −23.3 IRE below −20 IRE (REFERENCE.md §4, 100 % bars).
    const W = 1920; const H = 1080
    const frame = solidRgb8(128, 128, 128, W, H)
    const d = (frame as Extract<FrameInput, { kind: 'rgb' }>).data
    d.set([255, 255, 0], (532 * W + 1000) * 3)
    d.set([0, 0, 255], (1079 * W + 7) * 3)
    const spec = builtinSpec('ntsc-setup')!
    const a = analyseFrame(frame, { spec, keepDensities: true })
    expect(a.reasons.map(r => r.limit).sort()).toEqual(['composite-max', 'composite-min'])
    const steps: string[] = []
    const images = await renderFrameImages(frame, a, spec, '601', async (name, f) => { steps.push(name); return f() })
    expect(steps.slice(0, 3)).toEqual(['overlay picture (libvips)', 'overlay paint', 'overlay png'])
    const { data, info } = await decode(images.overlay.data)
    expect([info.width, info.height, info.channels]).toEqual([OVERLAY_WIDTH, 720, 3])
    const own = renderRangeOverlay(frame, spec, { maxWidth: OVERLAY_WIDTH })
    const isMark = (c: number[]) => [PALETTE.overlayHigh, PALETTE.overlayLow].findIndex(m => m.every((v, k) => v === c[k])) + 1
    const marks: string[] = []
    const ownMarks: string[] = []
    for (let i = 0; i < OVERLAY_WIDTH * 720; i++) {
      const m = isMark([...data.subarray(i * 3, i * 3 + 3)])
      if (m) marks.push(`${i % OVERLAY_WIDTH},${Math.floor(i / OVERLAY_WIDTH)}:${m}`)
      const o = isMark([...own.data.subarray(i * 4, i * 4 + 3)])
      if (o) ownMarks.push(`${i % OVERLAY_WIDTH},${Math.floor(i / OVERLAY_WIDTH)}:${o}`)
    }
    // Computed blocks: (⌊1000·2/3⌋, ⌊532·2/3⌋) = (666, 354) above, (⌊7·2/3⌋, ⌊1079·2/3⌋) = (4, 719) below.
    expect(marks).toEqual(['666,354:1', '4,719:2'])
    expect(ownMarks).toEqual(marks)
    // Away from the marks the picture is the grey frame.
    expect([...data.subarray(0, 3)]).toEqual([128, 128, 128])
  })

  it('makes the thumbnail of a raw Y\'CbCr capture from the same pass, as a JPEG', async () => {
    // 720×486 UYVY, the BT.601 raster (REFERENCE.md §5): 320 wide → 486 · 320/720 = 216 rows.
    const pairs = Array.from({ length: 360 }, (_, k): [number, number, number, number] => [16 + (k % 200), 16 + (k % 200), 128, 128])
    const frame = uyvyRow(pairs, 486)
    const spec = builtinSpec('ntsc-setup')!
    const images = await renderFrameImages(frame, analyseFrame(frame, { spec, keepDensities: true }), spec, '601')
    const thumb = await sharp(images.thumb.data).metadata()
    expect([images.thumb.contentType, thumb.format, thumb.width, thumb.height]).toEqual(['image/jpeg', 'jpeg', 320, 216])
    const overlay = await sharp(images.overlay.data).metadata()
    // Narrower than the overlay width: kept at the frame's own size.
    expect([overlay.width, overlay.height]).toEqual([720, 486])
  })

  it('refuses an analysis made without the scope data rather than storing empty scopes', async () => {
    const frame = solidRgb8(128, 128, 128)
    const spec = builtinSpec('ntsc-setup')!
    await expect(renderFrameImages(frame, analyseFrame(frame, { spec }), spec, '601')).rejects.toThrow(/keepDensities/)
  })
})
