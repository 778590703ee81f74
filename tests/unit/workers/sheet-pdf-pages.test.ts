// The pass/fail sheet's PDF as a reader sees it: its pages rendered to images by Debian's
// pdftoppm (poppler-utils, installed by `npm test`), not read as text. The frame page must show
// the picture itself with the range marks over it, at the frame's own shape, and be a
// portrait report page (picture across the top, waveforms and a smaller vectorscope below).
import { execFileSync } from 'node:child_process'
import { mkdirSync, mkdtempSync, readdirSync, rmSync, copyFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import sharp from 'sharp'
import { afterAll, describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec } from '../../../shared/engine/index'
import { decodeBytes } from '../../../server/lib/decode-file'
import { renderFrameImages } from '../../../workers/lib/frame-images'
import { sheetPicture } from '../../../workers/lib/sheet-picture'
import { renderSheetPdf } from '../../../workers/sheet-pdf'
import { summarise, type SheetRow } from '../../../server/lib/sheet-rules'

const W = 640
const H = 360
// Three quarters a legal mid green, the right quarter 100 % yellow: full-range R'G'B'
// (255, 255, 0) has a composite peak near 131 IRE on the NTSC scale (SMPTE 170M IRE scale — memory; computed from BT.601, the
// 100 % bar table), beyond the spec's +120 IRE, so only that quarter carries marks.
const GREEN = [60, 160, 60] as const
const YELLOW = [255, 255, 0] as const
const MARK_HIGH = [255, 48, 150] as const

async function framePng(): Promise<Buffer> {
  const data = Buffer.alloc(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) data.set(x < (W * 3) / 4 ? GREEN : YELLOW, (y * W + x) * 3)
  }
  return sharp(data, { raw: { width: W, height: H, channels: 3 } }).png().toBuffer()
}

const near = (p: ArrayLike<number>, i: number, c: readonly number[], tol: number) =>
  Math.abs(p[i]! - c[0]!) <= tol && Math.abs(p[i + 1]! - c[1]!) <= tol && Math.abs(p[i + 2]! - c[2]!) <= tol

/** Bounding box and count of the pixels near a colour, in rows `from` to `to` (exclusive). */
function box(data: Buffer, width: number, height: number, c: readonly number[], tol: number, from = 0, to = height) {
  let x0 = width; let y0 = height; let x1 = -1; let y1 = -1; let n = 0
  for (let y = from; y < to; y++) {
    for (let x = 0; x < width; x++) {
      if (!near(data, (y * width + x) * 3, c, tol)) continue
      n++
      x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y)
    }
  }
  return { x0, y0, x1, y1, n, w: x1 - x0 + 1, h: y1 - y0 + 1 }
}

const dir = mkdtempSync(join(tmpdir(), 'lw-sheet-pdf-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

describe('the sheet PDF rendered to images (pdftoppm)', () => {
  it('shows the frame\'s picture with its marks at its own shape on a portrait report page', async () => {
    const png = await framePng()
    const spec = builtinSpec('ntsc-setup')!
    const input = await decodeBytes(png, { range: 'full' })
    const analysis = analyseFrame(input, { spec, keepDensities: true })
    expect(analysis.verdict).toBe('fail')
    const images = await renderFrameImages(input, analysis, '601')
    const picture = await sheetPicture({
      frame: { format: 'png', width: W, height: H }, reel: { sourceRange: 'full', matrix: '601' }, maxPixels: 40_000_000,
      viewing: async () => null, original: async () => png, overlay: async () => images.overlay.data,
    })
    expect([picture.width, picture.height]).toEqual([W, H])

    const row: SheetRow = {
      frameId: 7, seq: 3, name: 'yellow-edge_0003.png', timecode: null, status: 'done', failReason: null, verdict: 'fail',
      lumaMinIre: 40, lumaMaxIre: 93, compMaxIre: 131, outShare: 0.25, specName: spec.name, specVersion: 1, engineVersion: '1.0.0',
      reasons: [{ limit: 'composite-max', message: 'Composite above +120 IRE: 131.0', severity: 'fail' }],
      decision: 'rejected', note: 'Yellow sign too hot, regrade', decidedBy: 'Ada Reviewer (fictional)', decidedAt: new Date('2026-05-04T13:00:00Z'),
    }
    const pdf = await renderSheetPdf({
      production: { name: 'Tidewrack Mill (fictional)', client: '' }, team: { name: 'Unit team' },
      reel: { id: 1, name: 'Day 1 - Camera A', sourceLabel: '', sourceRange: 'full', matrix: '601' },
      signoff: { id: 9, signerName: 'Ada Reviewer (fictional)', signedAt: new Date('2026-05-04T14:03:00Z'), specVersion: 1, engineVersion: '1.0.0' },
      spec, rows: [row], summary: summarise([row]),
      images: {
        thumb: async () => images.thumb.data,
        scope: async (_id, kind) => images[kind].data,
        picture: async () => picture,
      },
    })
    writeFileSync(join(dir, 'sheet.pdf'), pdf)
    execFileSync('pdftoppm', ['-r', '72', '-png', join(dir, 'sheet.pdf'), join(dir, 'page')])
    const pages = readdirSync(dir).filter((f) => f.startsWith('page')).sort()
    // Cover, spec, frames, and one page for the failing frame.
    expect(pages).toHaveLength(4)
    const last = join(dir, pages.at(-1)!)
    const screens = join(process.cwd(), 'test-results', 'screens')
    mkdirSync(screens, { recursive: true })
    copyFileSync(last, join(screens, 'sheet-pdf-frame-page.png'))
    copyFileSync(join(dir, pages[0]!), join(screens, 'sheet-pdf-cover.png'))

    const { data, info } = await sharp(last).removeAlpha().raw().toBuffer({ resolveWithObject: true })
    // A4 portrait is 595.28 × 841.89 points (pdfkit's size table); at 72 dpi pdftoppm rounds up.
    expect([info.width, info.height]).toEqual([596, 842])
    // The picture itself: its green part is a block three quarters of the frame wide, with the
    // frame's shape (480 × 360 → 4:3; computed), not stretched to a box.
    const green = box(data, info.width, info.height, GREEN, 24)
    expect(green.n).toBeGreaterThan(0.9 * green.w * green.h)
    expect(green.w).toBeGreaterThan(300)
    expect(green.w / green.h).toBeCloseTo(480 / 360, 1)
    // The marks lie over the right quarter, beside the green, the same height: the picture's
    // whole region is picture or marks, never black.
    // (Searched in the picture's rows: the legend below repeats the colour in a small square.)
    const marks = box(data, info.width, info.height, MARK_HIGH, 24, green.y0, green.y1 + 1)
    expect(marks.n).toBeGreaterThan(0.8 * marks.w * marks.h)
    expect(Math.abs(marks.x0 - (green.x1 + 1))).toBeLessThanOrEqual(2)
    expect(Math.abs(marks.h - green.h)).toBeLessThanOrEqual(2)
    expect(marks.w / (green.w + marks.w)).toBeCloseTo(0.25, 1)
    let dark = 0
    for (let y = green.y0; y <= green.y1; y++) {
      for (let x = green.x0; x <= marks.x1; x++) if (near(data, (y * info.width + x) * 3, [0, 0, 0], 40)) dark++
    }
    expect(dark).toBe(0)
    // The picture spans the top of the page; the scopes sit below it.
    expect(green.y0).toBeLessThan(info.height / 4)
  })
})
