// Timecodes carried in a file's metadata. PNG text chunks: keyword, NUL, Latin-1 text, with a
// CRC-32 over type and data (ISO/IEC 15948 / PNG 2nd edition, 11.3.4.3 tEXt — memory); the
// XMP form is the Dynamic Media namespace's Timecode type, `xmpDM:timeValue` (Adobe XMP
// Specification Part 2 — memory). sharp 0.35 reads both (metadata().comments, .xmpAsString).
import { crc32 } from 'node:zlib'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { embeddedTimecode, inspectUpload } from '../../../server/lib/intake'
import { frameTimecode } from '../../../server/lib/frames'

function chunk(type: string, data: Buffer) {
  const len = Buffer.alloc(4)
  len.writeUInt32BE(data.length)
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data])
  const crc = Buffer.alloc(4)
  crc.writeUInt32BE(crc32(body) >>> 0)
  return Buffer.concat([len, body, crc])
}

async function pngWithText(keyword: string, text: string) {
  const png = await sharp({ create: { width: 8, height: 6, channels: 3, background: '#808080' } }).png().toBuffer()
  const afterIhdr = 8 + 8 + 13 + 4 // signature, IHDR length+type, 13 data bytes, CRC
  return Buffer.concat([png.subarray(0, afterIhdr), chunk('tEXt', Buffer.from(`${keyword}\0${text}`, 'latin1')), png.subarray(afterIhdr)])
}

describe('timecode from the file', () => {
  it('reads a PNG tEXt "timecode" chunk', async () => {
    const inspected = await inspectUpload(await pngWithText('timecode', '01:00:12:05'), { format: 'png' })
    expect(inspected.timecode).toEqual({ h: 1, m: 0, s: 12, f: 5, dropFrame: false })
  })

  it('ignores other text chunks and a text that is not a timecode', async () => {
    expect((await inspectUpload(await pngWithText('Comment', '01:00:12:05'), { format: 'png' })).timecode).toBeNull()
    expect((await inspectUpload(await pngWithText('timecode', 'one hour'), { format: 'png' })).timecode).toBeNull()
  })

  it('reads an XMP xmpDM:timeValue in element or attribute form', () => {
    expect(embeddedTimecode({ xmpAsString: '<xmpDM:startTimecode><rdf:Description><xmpDM:timeValue>10:00:00;02</xmpDM:timeValue>' }))
      .toEqual({ h: 10, m: 0, s: 0, f: 2, dropFrame: true })
    expect(embeddedTimecode({ xmpAsString: '<rdf:Description xmpDM:timeValue="00:59:59:23"/>' })).toEqual({ h: 0, m: 59, s: 59, f: 23, dropFrame: false })
  })

  it('prefers the metadata to the name, falls back to the name, and says null where there is none', () => {
    const reel = { frameRate: '25' as const, dropFrame: false }
    const tc = { h: 2, m: 0, s: 0, f: 0, dropFrame: false }
    const inspected = { format: 'png' as const, width: 8, height: 6 }
    expect(frameTimecode({ name: 'a_01-00-12-05.png', inspected: { ...inspected, timecode: tc } }, reel)).toBe('02:00:00:00')
    expect(frameTimecode({ name: 'a_01-00-12-05.png', inspected }, reel)).toBe('01:00:12:05')
    expect(frameTimecode({ name: 'a_0001.png', inspected }, reel)).toBeNull()
    // Frame 29 cannot exist at 25 fps.
    expect(frameTimecode({ name: 'a_01-00-12-29.png', inspected }, reel)).toBeNull()
  })
})
