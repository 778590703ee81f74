// The line data the worker stores (server/lib/frame-lines.ts): a line read back from it gives
// the line plot the engine computes from the whole decoded frame, number for number, for every
// input kind an upload can be.
import { describe, expect, it } from 'vitest'
import { linePlot } from '../../../shared/engine'
import { lineJson } from '../../../shared/utils/report'
import { decodeBytes } from '../../../server/lib/decode-file'
import { encodeFrameLines, FrameLinesError, readFrameLine } from '../../../server/lib/frame-lines'
import { png16, png8, uyvy, v210 } from '../../support/images'

/** An S3 stand-in that answers ranged reads of one stored object, as GetObject with Range does. */
function memoryStorage(object: Uint8Array) {
  let reads = 0
  return {
    get reads() { return reads },
    async getRange(_key: string, start: number, end: number) {
      reads++
      return object.slice(start, Math.min(end, object.length))
    },
  }
}

const cases = [
  { name: '8-bit R\'G\'B\' PNG, full range', bytes: () => png8(333, 41, 5), opts: { range: 'full' as const }, matrix: '601' as const },
  { name: '8-bit R\'G\'B\' PNG, studio range', bytes: () => png8(160, 9, 6), opts: { range: 'studio' as const }, matrix: '709' as const },
  { name: '16-bit R\'G\'B\' PNG', bytes: () => png16(256, 17, 7), opts: { range: 'full' as const }, matrix: '709' as const },
  { name: 'raw UYVY', bytes: async () => uyvy(720, 12, 8), opts: { raw: 'uyvy' as const, width: 720, height: 12 }, matrix: '601' as const },
  { name: 'raw v210', bytes: async () => v210(1920, 5, 9), opts: { raw: 'v210' as const, width: 1920, height: 5 }, matrix: '709' as const },
]

describe('frame line data', () => {
  for (const c of cases) {
    it(`${c.name}: every line read back plots as the engine plots it from the whole frame`, async () => {
      const input = await decodeBytes(await c.bytes(), c.opts)
      const storage = memoryStorage(encodeFrameLines(input))
      for (let n = 0; n < input.height; n++) {
        const row = await readFrameLine(storage, 'k', n)
        expect(row.height).toBe(1)
        const got = lineJson({ ...linePlot(row, 0, { matrix: c.matrix }), index: n })
        expect(got).toEqual(lineJson(linePlot(input, n, { matrix: c.matrix })))
      }
      // Two ranged reads a line: the header, then the line.
      expect(storage.reads).toBe(2 * input.height)
    })
  }

  it('refuses a line outside the picture and an object that is not line data', async () => {
    const input = await decodeBytes(uyvy(8, 3, 1), { raw: 'uyvy', width: 8, height: 3 })
    await expect(readFrameLine(memoryStorage(encodeFrameLines(input)), 'k', 3)).rejects.toThrow(FrameLinesError)
    await expect(readFrameLine(memoryStorage(new Uint8Array(300)), 'k', 0)).rejects.toThrow('not line data')
  })
})
