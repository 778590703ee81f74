// The PDF's scope page writes the scales as text beside and over the images (the images carry
// lines, not numbers): the waveform's IRE levels and the vectorscope's target names and
// skin-tone line can be read and searched. The page is rendered with pdftoppm (Debian's
// poppler-utils) to test-results/screens/ for a person to look at.
import { execFileSync } from 'node:child_process'
import { mkdirSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { PDFParse } from 'pdf-parse'
import { describe, expect, it } from 'vitest'
import { analyseFrame, builtinSpec, DEFAULT_SPEC_NAME } from '../../shared/engine'
import { summarise, type SheetRow } from '../../server/lib/sheet-rules'
import { decodeBytes } from '../../server/lib/decode-file'
import { renderFrameImages } from '../../workers/lib/frame-images'
import { renderSheetPdf } from '../../workers/sheet-pdf'
import sharp from 'sharp'

async function bars75() {
  const [width, height] = [720, 486]
  const cols = [[191, 191, 191], [191, 191, 0], [0, 191, 191], [0, 191, 0], [191, 0, 191], [191, 0, 0], [0, 0, 191]]
  const px = Buffer.alloc(width * height * 3)
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) px.set(cols[Math.min(6, Math.floor((x * 7) / width))]!, (y * width + x) * 3)
  return sharp(px, { raw: { width, height, channels: 3 } }).png().toBuffer()
}

describe('PDF scope page', () => {
  it('writes the waveform levels and the vectorscope names as text', async () => {
    const spec = builtinSpec(DEFAULT_SPEC_NAME)!
    const input = await decodeBytes(await bars75(), { range: 'full' })
    const a = analyseFrame(input, { matrix: '709', spec, keepDensities: true })
    const images = await renderFrameImages(input, a, '709')
    const row: SheetRow = {
      frameId: 1, seq: 1, name: 'bars_01-00-00-00.png', timecode: '01:00:00:00', status: 'done', failReason: null, verdict: 'fail',
      lumaMinIre: a.lumaIre.min, lumaMaxIre: a.lumaIre.max, compMaxIre: a.compositeIre.max, outShare: 0.1, specName: spec.name, specVersion: 1, engineVersion: '1',
      reasons: [{ limit: 'composite-min', message: 'Composite below −20 IRE', severity: 'fail' }], decision: 'rejected', note: 'SD bars read as BT.709', decidedBy: 'Rae Tester', decidedAt: new Date(),
    }
    const pdf = await renderSheetPdf({
      production: { name: 'Scope page check (fictional)', client: '' }, team: { name: 'Unit team' },
      reel: { id: 1, name: 'Bars', sourceLabel: '', sourceRange: 'full', matrix: '709' },
      signoff: { id: 1, signerName: 'Rae Tester', signedAt: new Date('2026-05-04T14:03:00Z'), specVersion: 1, engineVersion: '1' },
      spec, rows: [row], summary: summarise([row]),
      images: { thumb: async () => null, picture: async () => null, scope: async (_id, kind) => (images as Record<string, { data: Uint8Array }>)[kind]?.data ?? null },
    })
    const parser = new PDFParse({ data: new Uint8Array(pdf) })
    const pages = (await parser.getText()).pages
    await parser.destroy()
    const scopePage = pages.findIndex((p) => p.text.includes('Picture with range marks'))
    expect(scopePage).toBeGreaterThan(-1)
    const text = pages[scopePage]!.text.replace(/\s+/g, ' ')
    for (const s of ['IRE', '−20', '7.5', '100', '120', 'skin tone', 'Yl', 'Cy', 'Mg']) expect(text, s).toContain(s)
    const dir = join(process.cwd(), 'test-results', 'screens')
    mkdirSync(dir, { recursive: true })
    const file = join(dir, 'sheet-scopes.pdf')
    writeFileSync(file, pdf)
    execFileSync('pdftoppm', ['-png', '-r', '110', '-f', String(scopePage + 1), '-l', String(scopePage + 1), file, join(dir, 'sheet-scope-page')])
  })
})
