// The pass/fail sheet's pure parts: what blocks a sign-off, the overall-result rule, the CSV
// records and the PDF's text, on rows made up here (no services).
import { parse } from 'csv-parse/sync'
import { PDFParse } from 'pdf-parse'
import { describe, expect, it } from 'vitest'
import { builtinSpec } from '../../shared/engine'
import { CSV_COLUMNS, csvRecord, framesWithScopes, safeText, signoffBlockers, summarise, type SheetRow } from '../../server/lib/sheet-rules'
import { sheetCsv } from '../../workers/sheet'
import { CAUTION_TEXT, renderSheetPdf } from '../../workers/sheet-pdf'

let next = 1
function row(over: Partial<SheetRow> = {}): SheetRow {
  const seq = next++
  return {
    frameId: 1000 + seq, seq, name: `f${seq}.png`, timecode: null, status: 'done', failReason: null, verdict: 'pass',
    lumaMinIre: 7.5, lumaMaxIre: 95, compMaxIre: 110, outShare: 0, specName: 'ntsc-setup', specVersion: 1, engineVersion: '1.0.0',
    reasons: [], decision: null, note: '', decidedBy: null, decidedAt: null, ...over,
  }
}

describe('sign-off blockers', () => {
  it('names pending, undecodable and undecided failing frames by index and name', () => {
    const rows = [
      row({ seq: 1, name: 'a.png', status: 'queued', verdict: null }),
      row({ seq: 2, name: 'b.png', status: 'analysing', verdict: null }),
      row({ seq: 3, name: 'c.png', status: 'analysing', verdict: null }),
      row({ seq: 4, name: 'd.png', verdict: 'fail' }),
      row({ seq: 9, name: 'e.png', verdict: 'fail' }),
      row({ seq: 10, name: 'ok.png', verdict: 'fail', decision: 'waived', note: 'highlight' }),
      row({ seq: 11, name: 'broken.png', status: 'failed', verdict: null }),
      row({ seq: 12, name: 'broken2.png', status: 'failed', verdict: null, decision: 'rejected', note: 'truncated file' }),
      row({ seq: 13, name: 'warm.png', verdict: 'caution' }),
    ]
    expect(signoffBlockers(rows).map((b) => b.message)).toEqual([
      '3 frames still analysing: #1 a.png, #2 b.png, #3 c.png',
      '1 frame could not be measured (the file did not decode) and is not rejected: #11 broken.png',
      '2 failing frames have no decision: #4 d.png, #9 e.png',
    ])
  })

  it('refuses an empty reel and lists at most ten frames', () => {
    expect(signoffBlockers([])[0]!.message).toBe('The reel has no frames to sign off')
    const many = Array.from({ length: 13 }, (_, i) => row({ seq: i + 1, name: `x${i + 1}.png`, verdict: 'fail' }))
    expect(signoffBlockers(many)[0]!.message).toMatch(/^13 failing frames have no decision: #1 x1\.png, .*#10 x10\.png and 3 more$/)
  })

  it('has nothing to say when every frame is measured and every failing frame decided', () => {
    expect(signoffBlockers([row(), row({ verdict: 'caution' }), row({ verdict: 'fail', decision: 'accepted' })])).toEqual([])
  })
})

describe('overall result', () => {
  it('passes when every frame passes or is cautioned and nothing was overridden', () => {
    const s = summarise([row(), row({ verdict: 'caution' }), row({ decision: 'accepted' })])
    expect(s).toMatchObject({ frames: 3, overall: 'pass', verdicts: { pass: 2, caution: 1, fail: 0, notMeasured: 0 }, decisions: { accepted: 1, none: 2 } })
    expect(s.because).toBe('every frame within the spec; 1 frame near a limit (caution)')
  })

  it('passes with exceptions when a failing frame is accepted or waived, or any frame is waived', () => {
    expect(summarise([row(), row({ verdict: 'fail', decision: 'waived', note: 'specular' })])).toMatchObject({ overall: 'pass-with-exceptions', overridden: 1 })
    expect(summarise([row(), row({ verdict: 'fail', decision: 'accepted' })]).because).toBe('1 failing frame accepted or waived by a reviewer')
    expect(summarise([row({ verdict: 'caution', decision: 'waived', note: 'ok' })])).toMatchObject({ overall: 'pass-with-exceptions', because: '1 frame waived' })
  })

  it('fails when any frame is rejected, even a passing one, and when a failing frame has no decision', () => {
    expect(summarise([row(), row({ decision: 'rejected', note: 'soft focus' })])).toMatchObject({ overall: 'fail', because: '1 frame rejected' })
    expect(summarise([row(), row({ verdict: 'fail' })])).toMatchObject({ overall: 'fail', because: '1 failing frame without a decision' })
    const s = summarise([row({ status: 'failed', verdict: null }), row({ status: 'failed', verdict: null, decision: 'rejected', note: 'bad file' })])
    expect(s).toMatchObject({ overall: 'fail', because: '1 frame rejected; 1 frame not measured', verdicts: { notMeasured: 2 } })
    expect(summarise([]).overall).toBe('fail')
  })

  it('puts scope pages behind failing, rejected and waived frames only', () => {
    const rows = [row({ seq: 1 }), row({ seq: 2, verdict: 'fail', decision: 'accepted' }), row({ seq: 3, decision: 'rejected', note: 'x' }),
      row({ seq: 4, verdict: 'caution', decision: 'waived', note: 'y' }), row({ seq: 5, status: 'failed', verdict: null, decision: 'rejected', note: 'z' })]
    expect(framesWithScopes(rows).map((r) => r.seq)).toEqual([2, 3, 4])
  })
})

describe('CSV', () => {
  it('keeps a spreadsheet from running a name or note as a formula', () => {
    expect(safeText('=HYPERLINK("x")')).toBe('\'=HYPERLINK("x")')
    expect(safeText('+1')).toBe('\'+1')
    expect(safeText('@sum')).toBe('\'@sum')
    expect(safeText('plain, "quoted"')).toBe('plain, "quoted"')
    // After a delimiter a spreadsheet may start a new cell (a file split on ';' or ','): neutralised there too.
    expect(safeText('shot;=1+1')).toBe("shot;'=1+1")
    expect(safeText('a, -2+3')).toBe("a, '-2+3")
    expect(safeText('a,@x;+y')).toBe("a,'@x;'+y")
  })

  it('quotes every text cell, so ;=1+1 in a name stays inside its quotes', () => {
    const text = sheetCsv([row({ seq: 3, name: 'take;=1+1.png', note: 'ok' })])
    const line = text.split('\r\n')[1]!
    expect(line).toContain('"take;\'=1+1.png"')
    expect(line.startsWith('3,')).toBe(true)
    expect(line).toContain(',"ok",')
  })

  it('says "no timecode" where a frame has none, and writes the label where it has one', () => {
    expect(csvRecord(row({ seq: 1, timecode: null })).timecode).toBe('no timecode')
    expect(csvRecord(row({ seq: 2, timecode: '01:00:12;05' })).timecode).toBe('01:00:12;05')
  })

  it('writes one record per frame that parses back to the same fields', () => {
    const decidedAt = new Date('2026-03-01T10:20:30.000Z')
    const rows = [
      row({ seq: 1, name: 'a, "b".png', timecode: '01:00:00:01', lumaMinIre: -3.14159, lumaMaxIre: 104.2, compMaxIre: 121.555, outShare: 0.0123456, verdict: 'fail',
        reasons: [{ limit: 'luma-max', message: 'Luma above white', severity: 'fail' }], decision: 'waived', note: 'line one\nline two', decidedBy: 'Ada', decidedAt,
        history: [
          { at: new Date('2026-03-01T09:00:10.000Z'), decision: 'accepted', note: '', by: 'Ben' },
          { at: new Date('2026-03-01T09:30:00.000Z'), decision: 'rejected', note: 'too hot', by: null },
          { at: decidedAt, decision: 'waived', note: 'line one\nline two', by: 'Ada' },
        ],
        lineup: ['Bars check: pass', 'Blanking: fail'] }),
      row({ seq: 2, status: 'failed', failReason: 'The file cannot be decoded: truncated', verdict: null, lumaMinIre: null, lumaMaxIre: null, compMaxIre: null, outShare: null, specName: null, specVersion: null, engineVersion: null, decision: 'rejected', note: '=bad' }),
    ]
    const text = sheetCsv(rows)
    expect(text.startsWith('\uFEFFindex,timecode,name,')).toBe(true)
    const parsed = parse(text, { columns: true, bom: true }) as Record<string, string>[]
    expect(Object.keys(parsed[0]!)).toEqual([...CSV_COLUMNS])
    // Values rounded to 0.01 IRE and 0.0001 % (computed: 0.0123456 × 100 = 1.23456 → 1.2346).
    expect(parsed[0]).toEqual({
      index: '1', timecode: '01:00:00:01', name: 'a, "b".png', status: 'done', luma_min_ire: '-3.14', luma_max_ire: '104.20', composite_max_ire: '121.56',
      out_of_range_pct: '1.2346', verdict: 'fail', reasons: 'Luma above white', decision: 'waived', note: 'line one\nline two', decided_by: 'Ada',
      decided_at: '2026-03-01T10:20:30.000Z', spec: 'ntsc-setup', spec_version: '1', engine_version: '1.0.0',
      // Every decision, oldest first: the earlier accept and reject are not lost when a later one replaces them.
      decision_history: '2026-03-01 09:00 UTC accepted by Ben; 2026-03-01 09:30 UTC rejected by a former member: too hot; '
        + '2026-03-01 10:20 UTC waived by Ada: line one\nline two',
      lineup: 'Bars check: pass | Blanking: fail',
    })
    expect(parsed[1]).toMatchObject({ status: 'not measured', luma_min_ire: '', verdict: '', reasons: 'The file cannot be decoded: truncated', decision: 'rejected', note: '\'=bad' })
    expect(parsed.map((p) => csvRecord(rows[Number(p.index) - 1]!))).toEqual(parsed)
  })
})

describe('PDF', () => {
  it('prints the production, the spec with its sources, each frame, the result and the caution', async () => {
    const spec = builtinSpec('ntsc-setup')!
    const rows = [
      row({ seq: 1, name: 'wide_01.png', lumaMinIre: 7.5, lumaMaxIre: 99.94, compMaxIre: 112.3, verdict: 'pass' }),
      row({ seq: 2, name: 'close_02.png', timecode: '01:02:03:04', lumaMinIre: -2.25, lumaMaxIre: 104.5, compMaxIre: 125.04, outShare: 0.0042, verdict: 'fail',
        reasons: [{ limit: 'luma-max', message: 'Luma above white', severity: 'fail' }], decision: 'waived', note: 'Specular glint on the rail', decidedBy: 'Ada Reviewer', decidedAt: new Date(),
        lineup: ['Source match against Camera A / bars_a.v210: +2.1 IRE, gain ×1.000, chroma −4 %, hue +3.0°: FAIL'] }),
    ]
    const summary = summarise(rows)
    const pdf = await renderSheetPdf({
      production: { name: 'Tidewrack Mill (fictional)', client: 'Ombervale Media (fictional)' }, team: { name: 'Unit team' },
      reel: { id: 1, name: 'Day 2 - Camera B', sourceLabel: 'Camera B', sourceRange: 'full', matrix: '601' },
      signoff: { id: 42, signerName: 'Ada Reviewer', signedAt: new Date('2026-05-04T14:03:00Z'), specVersion: 3, engineVersion: '1.0.0' },
      spec, rows, summary, images: { thumb: async () => null, scope: async () => null, picture: async () => null },
    })
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-')
    const parser = new PDFParse({ data: new Uint8Array(pdf) })
    const text = (await parser.getText()).text.replace(/\s+/g, ' ')
    await parser.destroy()
    for (const s of ['Tidewrack Mill (fictional)', 'Day 2 - Camera B', 'PASS WITH EXCEPTIONS', 'Ada Reviewer', '2026-05-04 14:03 UTC', 'version 3', 'engine 1.0.0',
      'wide_01.png', 'close_02.png', '01:02:03:04', '99.9', '104.5', '-2.3', '125.0', '0.420 %', 'Specular glint on the rail', 'ITU-R BT.1700', '120 IRE', '7.5 IRE', '115 IRE',
      'Line-up checks (1)', 'Source match against Camera A / bars_a.v210: +2.1 IRE', 'SMPTE 170M as recalled']) {
      expect(text, s).toContain(s)
    }
    expect(text).toContain(CAUTION_TEXT.replace(/\s+/g, ' ').slice(0, 60))
  })
})
