// The pass/fail sheet as a PDF (pdfkit). Layout and wording are Linewise's own: a result
// block and the sign-off first, then the spec as it was signed, one row per frame, and the
// scopes of every frame that failed or was overridden by a person.
import { createRequire } from 'node:module'
import { readFileSync } from 'node:fs'
import { NO_TIMECODE } from '../shared/utils/timecode'
import PDFDocument from 'pdfkit'
import { SCALE_LABELS, SCALE_LIMIT_UNITS, vectorscopeMarks, waveformScaleMarks, type DeliverySpec, type LevelScale } from '../shared/engine'
import { DECISION_LABELS } from '../shared/utils/decisions'
import { OVERALL_LABELS, framesWithScopes, type SheetRow, type SheetSummary } from '../server/lib/sheet-rules'
import type { SheetClip } from '../server/lib/sheet-clips'

const require = createRequire(import.meta.url)
// The app's own font files (from @fontsource, already shipped for the web pages): pdfkit
// reads WOFF, not WOFF2, and embeds only the glyphs used.
const FONT_FILES = {
  regular: '@fontsource/inter/files/inter-latin-400-normal.woff',
  bold: '@fontsource/inter/files/inter-latin-600-normal.woff',
  mono: '@fontsource/roboto-mono/files/roboto-mono-latin-400-normal.woff',
} as const
let fonts: Record<keyof typeof FONT_FILES, Buffer> | undefined
function loadFonts() {
  fonts ??= Object.fromEntries(Object.entries(FONT_FILES).map(([k, f]) => [k, readFileSync(require.resolve(f))])) as Record<keyof typeof FONT_FILES, Buffer>
  return fonts
}

// Print colours of our own: dark ink on white, the app's teal for structure, and result
// tones dark enough to carry white text. Every colour also comes with a word.
const INK = '#15191e'
const MUTED = '#5b6670'
const RULE = '#c9d0d7'
const ACCENT = '#1f8f87'
// The marks' colours as the engine paints them (PALETTE.overlayHigh / overlayLow).
const MARK_HIGH = '#ff3096'
const MARK_LOW = '#18aaff'
const VERDICT_WORDS = { pass: 'Pass', caution: 'Caution', fail: 'Fail' } as const
const TONE = { pass: '#2c7a4b', caution: '#8a5a00', fail: '#b0362c', exceptions: '#8a5a00', none: '#5b6670' } as const

export interface SheetImages {
  thumb: (frameId: number) => Promise<Uint8Array | null>
  /** The picture with its range marks laid over it, at the frame's own shape. */
  picture: (frameId: number) => Promise<{ jpeg: Buffer; width: number; height: number } | null>
  scope: (frameId: number, kind: ScopeKind) => Promise<Uint8Array | null>
}

export const SCOPE_KINDS = ['waveform-luma', 'waveform-flat', 'vectorscope'] as const
export type ScopeKind = (typeof SCOPE_KINDS)[number]
const SCOPE_TITLES: Record<ScopeKind, string> = {
  'waveform-luma': 'Waveform, luma (IRE)',
  'waveform-flat': 'Waveform, flat: luma + chroma (IRE)',
  'vectorscope': 'Vectorscope',
}

export interface SheetInput {
  production: { name: string; client: string }
  team: { name: string }
  reel: { id: number; name: string; sourceLabel: string; sourceRange: string; matrix: string }
  signoff: { id: number; signerName: string; signedAt: Date; specVersion: number; engineVersion: string }
  spec: DeliverySpec
  rows: SheetRow[]
  summary: SheetSummary
  images: SheetImages
  /** The reel's clips with their events (server/lib/sheet-clips.ts). */
  clips?: SheetClip[]
}

/** Numbers with a plain hyphen-minus, so a reader's search for "-3.2" finds them. */
export const fmt = (v: number | null, digits = 1) => (v === null ? '—' : (Object.is(Math.round(v * 10 ** digits), -0) ? 0 : v).toFixed(digits))
export const fmtPct = (share: number | null) => (share === null ? '—' : share === 0 ? '0 %' : `${fmt(share * 100, share * 100 < 1 ? 3 : 2)} %`)
export const fmtUtc = (d: Date) => `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`

const QUANTITY_LABELS: Record<string, string> = { luma: "Luma Y'", composite: 'Composite (Y\' ± C)', rgb: "Each of R', G', B'", cb: 'Cb', cr: 'Cr' }
export const threshold = (value: number, unit: string) => `${fmt(value, Number.isInteger(value) ? 0 : 1)} ${SCALE_LIMIT_UNITS[unit as LevelScale] ?? unit}`

export const CAUTION_TEXT = 'Linewise measures levels as an aid to quality control. It does not replace the broadcaster\'s or distributor\'s '
  + 'own QC: their technical specification and their checks take precedence over this sheet. Check which spec and version '
  + 'they require before delivery.'

export async function renderSheetPdf(input: SheetInput): Promise<Buffer> {
  const f = loadFonts()
  const doc = new PDFDocument({
    size: 'A4', layout: 'landscape', margins: { top: 36, bottom: 44, left: 36, right: 36 }, bufferPages: true,
    info: { Title: `Pass/fail sheet — ${input.production.name} — ${input.reel.name}`, Author: input.signoff.signerName, Creator: `Linewise (engine ${input.signoff.engineVersion})` },
  })
  const done = new Promise<Buffer>((resolve, reject) => {
    const chunks: Buffer[] = []
    doc.on('data', (c: Buffer) => chunks.push(c))
    doc.on('end', () => resolve(Buffer.concat(chunks)))
    doc.on('error', reject)
  })
  doc.registerFont('regular', f.regular)
  doc.registerFont('bold', f.bold)
  doc.registerFont('mono', f.mono)

  const left = doc.page.margins.left
  const width = doc.page.width - left - doc.page.margins.right
  const bottom = () => doc.page.height - doc.page.margins.bottom

  await coverPage(doc, input, left, width)
  specSection(doc, input, left, width, bottom)
  await framesTable(doc, input, left, width, bottom)
  lineupSection(doc, input, left, width, bottom)
  clipsSection(doc, input, left, width, bottom)
  await scopePages(doc, input)
  footers(doc, input)
  doc.end()
  return done
}

type Doc = PDFKit.PDFDocument

function heading(doc: Doc, text: string, left: number, width: number) {
  doc.font('bold').fontSize(13).fillColor(INK).text(text, left, doc.y, { width })
  const y = doc.y + 3
  doc.moveTo(left, y).lineTo(left + width, y).lineWidth(0.75).strokeColor(ACCENT).stroke()
  doc.y = y + 8
}

function label(doc: Doc, text: string, x: number, y: number, w: number) {
  // As written: upper-casing would turn units such as mV into MV.
  doc.font('bold').fontSize(7.5).fillColor(MUTED).text(text, x, y, { width: w, characterSpacing: 0.2 })
}

async function coverPage(doc: Doc, input: SheetInput, left: number, width: number) {
  const { production, reel, signoff, summary, spec } = input
  doc.font('regular').fontSize(9).fillColor(ACCENT).text('LINEWISE · PASS/FAIL SHEET', left, 36, { characterSpacing: 1 })
  doc.font('bold').fontSize(22).fillColor(INK).text(production.name, left, doc.y + 4, { width })
  const sub = [`Reel: ${reel.name}`, reel.sourceLabel ? `Source: ${reel.sourceLabel}` : 'Source: not given', production.client ? `For: ${production.client}` : null, `Team: ${input.team.name}`]
  doc.font('regular').fontSize(10.5).fillColor(INK).text(sub.filter(Boolean).join('    '), left, doc.y + 2, { width })
  doc.fontSize(9).fillColor(MUTED).text(`Source range ${reel.sourceRange === 'studio' ? 'studio (16–235)' : 'full (0–255)'}; matrix BT.${reel.matrix}; levels in IRE on the 7.5-setup scale unless stated.`, left, doc.y + 2, { width })

  // Result block: the overall result in words on a tone, with the rule that decided it.
  const top = doc.y + 14
  const tone = summary.overall === 'pass' ? TONE.pass : summary.overall === 'fail' ? TONE.fail : TONE.exceptions
  const boxW = 250
  doc.rect(left, top, boxW, 74).fill(tone)
  doc.font('regular').fontSize(8).fillColor('#ffffff').text('OVERALL RESULT', left + 12, top + 10, { characterSpacing: 0.8 })
  doc.font('bold').fontSize(summary.overall === 'pass-with-exceptions' ? 17 : 24).fillColor('#ffffff').text(OVERALL_LABELS[summary.overall], left + 12, top + 26, { width: boxW - 24 })
  const rx = left + boxW + 18
  const rw = width - boxW - 18
  label(doc, 'Why', rx, top + 2, rw)
  doc.font('regular').fontSize(10.5).fillColor(INK).text(`${summary.because}.`, rx, top + 14, { width: rw })
  doc.fontSize(8.5).fillColor(MUTED).text('Rule: FAIL if any frame is rejected, any failing frame has no decision or any frame was not measured; '
    + 'PASS WITH EXCEPTIONS if a reviewer accepted or waived a failing frame, or waived any frame; otherwise PASS. Caution frames are inside the limits.', rx, doc.y + 4, { width: rw })

  // Counts by verdict and by decision.
  let y = Math.max(top + 74, doc.y) + 16
  const cells: [string, number, string][] = [
    ['Frames', summary.frames, INK],
    ['Pass', summary.verdicts.pass, TONE.pass], ['Caution', summary.verdicts.caution, TONE.caution], ['Fail', summary.verdicts.fail, TONE.fail], ['Not measured', summary.verdicts.notMeasured, MUTED],
    ['Accepted', summary.decisions.accepted, INK], ['Rejected', summary.decisions.rejected, TONE.fail], ['Waived', summary.decisions.waived, TONE.caution], ['No decision', summary.decisions.none, MUTED],
  ]
  const cw = width / cells.length
  label(doc, 'Verdicts (measured)', left + cw, y, cw * 4)
  label(doc, 'Decisions (by a reviewer)', left + cw * 5, y, cw * 4)
  y += 12
  cells.forEach(([name, n, colour], i) => {
    const x = left + i * cw
    doc.rect(x + 1, y, cw - 2, 40).lineWidth(0.5).strokeColor(RULE).stroke()
    doc.font('mono').fontSize(16).fillColor(colour).text(String(n), x + 8, y + 5, { width: cw - 16 })
    doc.font('regular').fontSize(8).fillColor(MUTED).text(name, x + 8, y + 26, { width: cw - 16 })
  })
  y += 58

  // Sign-off and provenance: who, when, against which spec and engine.
  const facts: [string, string][] = [
    ['Signed off by', signoff.signerName],
    ['Signed at', fmtUtc(signoff.signedAt)],
    ['Delivery spec', `${spec.title} (${spec.name}), version ${signoff.specVersion}`],
    ['Measured by', `Linewise engine ${signoff.engineVersion}`],
    ['Sign-off', `#${signoff.id}`],
  ]
  const fw = width / facts.length
  facts.forEach(([k, v], i) => {
    label(doc, k, left + i * fw, y, fw - 10)
    doc.font(i === 1 || i === 3 ? 'mono' : 'bold').fontSize(10).fillColor(INK).text(v, left + i * fw, y + 11, { width: fw - 10 })
  })
  y = doc.y + 22
  const mixed = mixedMeasurements(input)
  if (mixed) {
    doc.font('bold').fontSize(9.5).fillColor(TONE.fail).text(mixed, left, y, { width })
    y = doc.y + 8
  }
  doc.rect(left, y, width, 4).fill(ACCENT)
  doc.font('bold').fontSize(10).fillColor(INK).text('This sheet is an aid, not a delivery approval', left, y + 12, { width })
  doc.font('regular').fontSize(9.5).fillColor(INK).text(CAUTION_TEXT, left, doc.y + 3, { width })
}

/** Frames measured against another spec, version or engine than the one signed: said out loud. */
export function mixedMeasurements(input: Pick<SheetInput, 'rows' | 'spec' | 'signoff'>): string | null {
  const off = input.rows.filter((r) => r.status === 'done'
    && (r.specName !== input.spec.name || r.specVersion !== input.signoff.specVersion || r.engineVersion !== input.signoff.engineVersion))
  if (!off.length) return null
  const list = off.slice(0, 8).map((r) => `#${r.seq} (${r.specName} v${r.specVersion}, engine ${r.engineVersion})`).join(', ')
  return `Attention: ${off.length} frame(s) were measured against another spec version or engine than the one named here: ${list}${off.length > 8 ? ' and more' : ''}. Their verdicts follow that measurement.`
}

function specSection(doc: Doc, input: SheetInput, left: number, width: number, bottom: () => number) {
  doc.addPage()
  const { spec, signoff } = input
  heading(doc, `Delivery spec: ${spec.title} — version ${signoff.specVersion}`, left, width)
  label(doc, 'Thresholds and their sources, as signed', left, doc.y, width)
  doc.font('regular').fontSize(9.5).fillColor(INK).text(spec.description || 'The spec gives no description of its sources.', left, doc.y + 3, { width })
  doc.moveDown(0.8)
  const cols = [
    { title: 'Limit', w: 0.26 }, { title: 'Quantity', w: 0.16 }, { title: 'Bound', w: 0.1 }, { title: 'Threshold', w: 0.14 },
    { title: 'Caution from', w: 0.14 }, { title: 'Area tolerance', w: 0.2 },
  ]
  let y = doc.y
  const row = (cells: string[], font: 'bold' | 'regular', mono: boolean[]) => {
    let x = left
    const h = Math.max(...cells.map((c, i) => doc.font(mono[i] ? 'mono' : font).fontSize(9).heightOfString(c, { width: cols[i]!.w * width - 8 }))) + 8
    if (y + h > bottom()) { doc.addPage(); y = doc.page.margins.top }
    cells.forEach((c, i) => {
      doc.font(mono[i] ? 'mono' : font).fontSize(9).fillColor(INK).text(c, x + 4, y + 4, { width: cols[i]!.w * width - 8 })
      x += cols[i]!.w * width
    })
    doc.moveTo(left, y + h).lineTo(left + width, y + h).lineWidth(0.5).strokeColor(RULE).stroke()
    y += h
  }
  row(cols.map((c) => c.title), 'bold', cols.map(() => false))
  for (const l of spec.limits) {
    const cautionAt = l.warningMargin ? threshold(l.bound === 'max' ? l.value - l.warningMargin : l.value + l.warningMargin, l.unit) : 'no margin'
    row([
      `${l.label} (${l.id})`, QUANTITY_LABELS[l.quantity] ?? l.quantity, l.bound === 'max' ? 'at most' : 'at least', threshold(l.value, l.unit),
      cautionAt, l.areaTolerance ? `${fmt(l.areaTolerance * 100, 2)} % of the picture may stand beyond` : 'none: any pixel beyond counts',
    ], 'regular', [false, false, false, true, true, false])
  }
  doc.y = y + 10
  const units = [...new Set(spec.limits.map((l) => l.unit))].map((u) => `${SCALE_LIMIT_UNITS[u as LevelScale] ?? u} = ${SCALE_LABELS[u as LevelScale] ?? u}`)
  doc.font('regular').fontSize(8.5).fillColor(MUTED).text(`Units: ${units.join('; ')}. A frame is "caution" between the caution point and the threshold, "fail" beyond the threshold (over more than the area tolerance).`, left, doc.y, { width })
}

const FRAME_COLS = [
  { key: 'pic', title: 'Picture', w: 62 },
  { key: 'idx', title: '# / timecode', w: 66 },
  { key: 'name', title: 'Name', w: 150 },
  { key: 'lmin', title: 'Luma min IRE', w: 52, num: true },
  { key: 'lmax', title: 'Luma max IRE', w: 52, num: true },
  { key: 'cmax', title: 'Comp. max IRE', w: 56, num: true },
  { key: 'out', title: 'Out of range', w: 62, num: true },
  { key: 'verdict', title: 'Verdict', w: 56 },
  { key: 'decision', title: 'Decision', w: 60 },
  { key: 'note', title: 'Note', w: 0 },
] as const

async function framesTable(doc: Doc, input: SheetInput, left: number, width: number, bottom: () => number) {
  doc.addPage()
  heading(doc, `Frames (${input.rows.length})`, left, width)
  const fixed = FRAME_COLS.reduce((s, c) => s + c.w, 0)
  const widths = FRAME_COLS.map((c) => c.w || width - fixed)
  const xs = widths.reduce<number[]>((acc, _w, i) => [...acc, i ? acc[i - 1]! + widths[i - 1]! : left], [])
  let y = doc.y
  const header = () => {
    doc.rect(left, y, width, 26).fill('#eef1f3')
    FRAME_COLS.forEach((c, i) => {
      doc.font('bold').fontSize(7.5).fillColor(INK).text(c.title, xs[i]! + 3, y + 4, { width: widths[i]! - 6, align: 'num' in c ? 'right' : 'left' })
    })
    y += 26
  }
  header()
  for (const r of input.rows) {
    const note = [[r.decision && r.note ? r.note : '', r.decidedBy ? `— ${r.decidedBy}` : ''].filter(Boolean).join(' '), r.status === 'failed' ? (r.failReason ?? 'not measured') : '']
      .filter(Boolean).join('\n')
    const reasons = r.status === 'done' && r.verdict !== 'pass' ? r.reasons.map((x) => x.message).join('; ') : ''
    const nameH = doc.font('regular').fontSize(8).heightOfString(r.name, { width: widths[2]! - 6 })
      + (reasons ? doc.fontSize(7).heightOfString(reasons, { width: widths[2]! - 6 }) + 2 : 0)
    const noteH = note ? doc.font('regular').fontSize(8).heightOfString(note, { width: widths[9]! - 6 }) : 0
    const h = Math.max(38, nameH + 10, noteH + 10)
    if (y + h > bottom()) { doc.addPage(); y = doc.page.margins.top; header() }
    const thumb = r.status === 'done' ? await input.images.thumb(r.frameId) : null
    if (thumb) {
      try {
        doc.image(Buffer.from(thumb), xs[0]! + 3, y + 3, { fit: [widths[0]! - 6, h - 6] })
      } catch {
        doc.font('regular').fontSize(7).fillColor(MUTED).text('picture unreadable', xs[0]! + 3, y + 5, { width: widths[0]! - 6 })
      }
    } else {
      doc.font('regular').fontSize(7).fillColor(MUTED).text(r.status === 'failed' ? 'not decoded' : 'no picture', xs[0]! + 3, y + 5, { width: widths[0]! - 6 })
    }
    const cell = (i: number, text: string, opts: { font?: string; size?: number; colour?: string; right?: boolean } = {}) => {
      doc.font(opts.font ?? 'regular').fontSize(opts.size ?? 8).fillColor(opts.colour ?? INK)
        .text(text, xs[i]! + 3, y + 5, { width: widths[i]! - 6, align: opts.right ? 'right' : 'left' })
    }
    cell(1, `#${r.seq}\n${r.timecode ?? NO_TIMECODE}`, { font: 'mono' })
    cell(2, r.name)
    if (reasons) doc.font('regular').fontSize(7).fillColor(MUTED).text(reasons, xs[2]! + 3, doc.y + 2, { width: widths[2]! - 6 })
    cell(3, fmt(r.lumaMinIre), { font: 'mono', right: true })
    cell(4, fmt(r.lumaMaxIre), { font: 'mono', right: true })
    cell(5, fmt(r.compMaxIre), { font: 'mono', right: true })
    cell(6, fmtPct(r.outShare), { font: 'mono', right: true })
    const verdict = r.status === 'failed' ? 'not measured' : r.verdict ?? '—'
    cell(7, verdict.toUpperCase(), { font: 'bold', colour: r.verdict ? TONE[r.verdict] : MUTED })
    cell(8, r.decision ? DECISION_LABELS[r.decision] : 'none', { font: r.decision ? 'bold' : 'regular', colour: r.decision === 'rejected' ? TONE.fail : r.decision ? INK : MUTED })
    if (note) cell(9, note)
    doc.moveTo(left, y + h).lineTo(left + width, y + h).lineWidth(0.4).strokeColor(RULE).stroke()
    y += h
  }
  doc.y = y + 6
  if (doc.y + 20 > bottom()) doc.addPage()
  doc.font('regular').fontSize(8).fillColor(MUTED).text('Luma min/max and composite max in IRE (7.5 setup). Out of range: the largest share of the picture below black, above white, beyond the composite limits or outside the RGB gamut.', left, doc.y, { width })
}

/** Bars check, source match and blanking of every frame that has them. */
function lineupSection(doc: Doc, input: SheetInput, left: number, width: number, bottom: () => number) {
  const rows = input.rows.filter((r) => r.lineup?.length)
  if (!rows.length) return
  doc.addPage()
  heading(doc, `Line-up checks (${rows.length})`, left, width)
  for (const r of rows) {
    const text = r.lineup!.join('\n')
    const h = doc.font('regular').fontSize(8.5).heightOfString(text, { width: width - 90 }) + 8
    if (doc.y + h > bottom()) doc.addPage()
    const y = doc.y
    doc.font('mono').fontSize(8.5).fillColor(INK).text(`#${r.seq}`, left, y, { width: 80 })
    doc.font('regular').fontSize(8.5).fillColor(INK).text(text, left + 90, y, { width: width - 90 })
    doc.y = Math.max(doc.y, y + h)
  }
  doc.moveDown(0.5)
  doc.font('regular').fontSize(8).fillColor(MUTED).text('Bars read against SMPTE EG 1 / ITU-R BT.801 (SD) and SMPTE RP 219 (HD) tables; bars and matching tolerances are common practice, not a standard; blanking judged against SMPTE 170M as recalled (10.7–11.1 µs, at most 21 lines a field). These figures are an aid: the broadcaster’s own QC and spec take precedence.', left, doc.y, { width })
}

/**
 * One portrait page per frame that failed or was overridden, laid out as a report: the
 * picture with its range marks across the page at its own shape; below it the luma waveform
 * and the flat waveform on the left, and on the right a smaller vectorscope with the frame's
 * reasons and the reviewer's decision and note.
 */
async function scopePages(doc: Doc, input: SheetInput) {
  const frames = framesWithScopes(input.rows)
  for (const r of frames) {
    doc.addPage({ size: 'A4', layout: 'portrait', margins: { top: 36, bottom: 44, left: 36, right: 36 } })
    const left = doc.page.margins.left
    const width = doc.page.width - left - doc.page.margins.right
    const bottom = doc.page.height - doc.page.margins.bottom
    heading(doc, `Frame #${r.seq} — ${r.name}`, left, width)
    const verdict = r.verdict ? VERDICT_WORDS[r.verdict] : '—'
    doc.font('bold').fontSize(10).fillColor(r.verdict ? TONE[r.verdict] : MUTED).text(`Verdict: ${verdict}`, left, doc.y, { continued: true })
    doc.font('regular').fillColor(INK).text(`     Decision: ${r.decision ? DECISION_LABELS[r.decision] : 'none'}${r.decidedBy ? ` by ${r.decidedBy}` : ''}`)

    // The picture with its marks, full width, never taller than two fifths of the page.
    let y = doc.y + 8
    label(doc, 'Picture with range marks', left, y, width)
    y += 11
    const pic = await input.images.picture(r.frameId)
    const maxH = (bottom - y) * 0.42
    if (pic) {
      const scale = Math.min(width / pic.width, maxH / pic.height)
      const w = pic.width * scale
      const h = pic.height * scale
      doc.image(pic.jpeg, left + (width - w) / 2, y, { width: w, height: h })
      y += h + 4
    } else {
      doc.font('regular').fontSize(9).fillColor(MUTED).text('The picture is not available.', left, y, { width })
      y = doc.y + 4
    }
    doc.rect(left, y + 2, 8, 8).fill(MARK_HIGH)
    doc.font('regular').fontSize(8).fillColor(MUTED).text('above the upper limit', left + 12, y + 2, { lineBreak: false })
    doc.rect(left + 110, y + 2, 8, 8).fill(MARK_LOW)
    doc.fillColor(MUTED).text('below the lower limit (each mark is a block of the frame with a pixel beyond the limit)', left + 122, y + 2, { width: width - 122 })
    y = doc.y + 12

    // Below: waveforms on the left, a smaller vectorscope and the words on the right.
    const scopeMatrix = input.reel.matrix === '709' ? '709' : '601'
    const gap = 16
    const leftW = width * 0.6
    const rightX = left + leftW + gap
    const rightW = width - leftW - gap
    const half = (bottom - y - 2 * 13 - gap) / 2
    let ly = y
    for (const kind of ['waveform-luma', 'waveform-flat'] as const) {
      label(doc, SCOPE_TITLES[kind], left, ly, leftW)
      ly += 11
      ly += await placeImage(doc, await input.images.scope(r.frameId, kind), left, ly, leftW, half, { kind, matrix: scopeMatrix }) + gap / 2
    }
    let ry = y
    label(doc, SCOPE_TITLES.vectorscope, rightX, ry, rightW)
    ry += 11
    ry += await placeImage(doc, await input.images.scope(r.frameId, 'vectorscope'), rightX, ry, rightW, rightW, { kind: 'vectorscope', matrix: scopeMatrix }) + 12
    label(doc, 'Why', rightX, ry, rightW)
    const reasons = r.reasons.length ? r.reasons.map((x) => `• ${x.message}`).join('\n') : 'Within every limit of the spec.'
    doc.font('regular').fontSize(9).fillColor(INK).text(reasons, rightX, ry + 11, { width: rightW })
    ry = doc.y + 10
    label(doc, 'Decision and note', rightX, ry, rightW)
    const decided = r.decision
      ? `${DECISION_LABELS[r.decision]}${r.decidedBy ? ` by ${r.decidedBy}` : ''}${r.decidedAt ? `, ${fmtUtc(r.decidedAt)}` : ''}`
      : 'No decision.'
    doc.font('bold').fontSize(9).fillColor(INK).text(decided, rightX, ry + 11, { width: rightW })
    if (r.note) doc.font('regular').fontSize(9).text(`“${r.note}”`, rightX, doc.y + 2, { width: rightW, height: bottom - doc.y - 2, ellipsis: true })
  }
}

/** An image fitted into a box at its own shape, left-aligned; returns the height used. A scope
 * image gets its scale written as text beside or over it (the stored images carry lines, not numbers). */
async function placeImage(doc: Doc, img: Uint8Array | null, x: number, y: number, w: number, h: number,
  scope?: { kind: ScopeKind, matrix: '601' | '709' }): Promise<number> {
  if (img) {
    try {
      const waveform = scope && scope.kind !== 'vectorscope'
      const ix = waveform ? x + SCALE_COLUMN : x
      const iw = waveform ? w - SCALE_COLUMN : w
      // pdfkit's openImage is not in its type declarations; it reads the size without drawing.
      const opened = (doc as Doc & { openImage(src: Buffer): { width: number; height: number } }).openImage(Buffer.from(img))
      const scale = Math.min(iw / opened.width, h / opened.height)
      const placed = { x: ix, y, w: opened.width * scale, h: opened.height * scale }
      doc.image(opened as unknown as Buffer, placed.x, placed.y, { width: placed.w, height: placed.h })
      if (scope) scopeLabels(doc, scope.kind, placed, x, scope.matrix)
      return placed.h
    } catch { /* falls through to the note below */ }
  }
  doc.font('regular').fontSize(8).fillColor(MUTED).text('Image not available.', x, y, { width: w })
  return doc.heightOfString('Image not available.', { width: w })
}

const SCALE_COLUMN = 24

/**
 * The scale of a placed scope image as text: waveform levels in IRE down the left (from
 * `boxX`), the vectorscope's target names and skin-tone line by their marks.
 */
function scopeLabels(doc: Doc, kind: ScopeKind, placed: { x: number, y: number, w: number, h: number }, boxX: number, matrix: '601' | '709') {
  if (kind !== 'vectorscope') {
    for (const m of waveformScaleMarks('ire')) {
      doc.font('mono').fontSize(7).fillColor(m.key ? '#b06a10' : '#4a5563')
        .text(m.label, boxX + 1, placed.y + m.y * placed.h - 3.5, { width: placed.x - boxX - 3, align: 'right', lineBreak: false })
    }
    return
  }
  const marks = vectorscopeMarks(matrix)
  for (const t of marks.targets) {
    doc.font('bold').fontSize(7.5).fillColor('#e6ebf0').text(t.letter, placed.x + t.x * placed.w - 8, placed.y + t.y * placed.h - 4, { width: 16, align: 'center', lineBreak: false })
  }
  const s = marks.skinTone
  doc.font('regular').fontSize(7).fillColor('#d69676')
    .text('skin tone', placed.x + (s.from.x + (s.to.x - s.from.x) * 0.8) * placed.w - 40, placed.y + (s.from.y + (s.to.y - s.from.y) * 0.8) * placed.h - 10, { width: 40, align: 'right', lineBreak: false })
}

function footers(doc: Doc, input: SheetInput) {
  const range = doc.bufferedPageRange()
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i)
    // Pages differ in orientation: each footer takes its own page's width.
    const left = doc.page.margins.left
    const width = doc.page.width - left - doc.page.margins.right
    // Writing into the bottom margin would make pdfkit start a page of its own.
    const margin = doc.page.margins.bottom
    doc.page.margins.bottom = 0
    const y = doc.page.height - 28
    doc.moveTo(left, y - 4).lineTo(left + width, y - 4).lineWidth(0.4).strokeColor(RULE).stroke()
    doc.font('regular').fontSize(7.5).fillColor(MUTED)
      .text(`${input.production.name} · ${input.reel.name} · sign-off #${input.signoff.id} by ${input.signoff.signerName}, `
        + `${fmtUtc(input.signoff.signedAt)} · spec ${input.spec.name} v${input.signoff.specVersion} · engine ${input.signoff.engineVersion}`,
      left, y, { width: width - 70, height: 9, lineBreak: false, ellipsis: true })
    doc.text(`page ${i - range.start + 1} of ${range.count}`, left + width - 70, y, { width: 70, align: 'right', lineBreak: false })
    doc.page.margins.bottom = margin
  }
}

/** Each clip: duration, start timecode, and its events with timecode in/out, limits, worst values, decision and note. */
function clipsSection(doc: Doc, input: SheetInput, left: number, width: number, bottom: () => number) {
  const clips = input.clips ?? []
  if (!clips.length) return
  doc.addPage()
  heading(doc, `Clips (${clips.length})`, left, width)
  const cols = [70, 70, 40, 48, 0, 60, 150]
  const fixed = cols.reduce((a, b) => a + b, 0)
  const widths = cols.map((w) => w || width - fixed)
  const xs = widths.reduce<number[]>((acc, _w, i) => [...acc, i ? acc[i - 1]! + widths[i - 1]! : left], [])
  const titles = ['TC in', 'TC out', 'frames', 'verdict', 'limits broken (worst value)', 'decision', 'note']
  for (const c of clips) {
    if (doc.y + 60 > bottom()) doc.addPage()
    const dur = c.durationS !== null ? `${fmt(c.durationS, 2)} s` : '—'
    doc.font('bold').fontSize(10).fillColor(INK).text(c.name, left, doc.y, { width })
    doc.font('regular').fontSize(8).fillColor(MUTED).text([
      `starts ${c.startTimecode ?? '—'}${c.startTimecodeFound ? '' : ' (no timecode in the file; counted from 00:00:00:00)'}`,
      `${c.frames ?? '—'} frames, ${dur}${c.fps ? ` at ${fmt(c.fps, 3)} fps${c.dropFrame ? ' drop-frame' : ''}` : ''}`,
      c.status === 'done' ? `${c.events.length} event(s)` : `not measured: ${c.failReason ?? c.status}`,
    ].join(' · '), left, doc.y + 1, { width })
    if (c.note) doc.font('regular').fontSize(8).fillColor(TONE.caution).text(c.note, left, doc.y + 1, { width })
    doc.y += 4
    if (!c.events.length) { doc.y += 6; continue }
    let y = doc.y
    const header = () => {
      doc.rect(left, y, width, 16).fill('#eef1f3')
      titles.forEach((t, i) => doc.font('bold').fontSize(7.5).fillColor(INK).text(t, xs[i]! + 3, y + 4, { width: widths[i]! - 6 }))
      y += 16
    }
    header()
    for (const e of c.events) {
      const limits = e.limits.join('; ')
      const h = Math.max(16, doc.font('regular').fontSize(8).heightOfString(limits, { width: widths[4]! - 6 }) + 6,
        doc.heightOfString(e.note || ' ', { width: widths[6]! - 6 }) + 6)
      if (y + h > bottom()) { doc.addPage(); y = doc.page.margins.top; header() }
      const cells = [e.tcIn, e.tcOut, String(e.frames), e.verdict, limits, e.decision ?? 'undecided', e.note]
      cells.forEach((text, i) => {
        doc.font(i < 3 ? 'mono' : 'regular').fontSize(8).fillColor(i === 3 ? TONE[e.verdict] : INK).text(text, xs[i]! + 3, y + 3, { width: widths[i]! - 6 })
      })
      doc.moveTo(left, y + h).lineTo(left + width, y + h).lineWidth(0.4).strokeColor(RULE).stroke()
      y += h
    }
    doc.y = y + 10
    doc.x = left
  }
}
