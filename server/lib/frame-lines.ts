// The line data of a frame: every picture line's codes as the engine reads them, uncompressed
// at a fixed stride behind a small header. The worker writes it once from the decoded
// original; the line-plot route reads the header and one line with two ranged reads and hands
// that line to the engine, so the web server never decodes an original and the plot is
// computed from exactly the codes the analysis measured.
//
// Uncompressed on purpose: zlib level 1 took 106 ms of CPU per noisy 1080p frame (more than
// half the engine's time) to save 18 % of 6.2 MB (tests/bench/pipeline-steps.ts, measured
// once with it); a line is read by offset with no table.
import { v210Stride } from '../../shared/engine/decode'
import type { FrameInput } from '../../shared/engine/types'
import type { Storage } from './storage'

const MAGIC = 'LWL1'
/** Magic, the header's length and its JSON, padded; the lines follow. */
const HEADER_BYTES = 256

type LineLayout =
  | { kind: 'rgb', width: number, height: number, channels: 3 | 4, bitDepth: 8 | 16, range: 'full' | 'studio', rowBytes: number }
  | { kind: 'uyvy' | 'v210', width: number, height: number, rowBytes: number }

/** A line's bytes could not be read back as written; a stored object was damaged or replaced. */
export class FrameLinesError extends Error {
  override name = 'FrameLinesError'
}

function layoutOf(input: FrameInput): { layout: LineLayout, bytes: Uint8Array } {
  switch (input.kind) {
    case 'rgb': {
      const { data, width, height, channels, bitDepth, range } = input
      // 16-bit codes are stored in this machine's byte order, which every platform Node runs
      // on here shares (little-endian); the reader checks the header says so.
      const bytes = new Uint8Array(data.buffer, data.byteOffset, data.byteLength)
      return { layout: { kind: 'rgb', width, height, channels, bitDepth, range, rowBytes: width * channels * (bitDepth / 8) }, bytes }
    }
    case 'uyvy':
      return { layout: { kind: 'uyvy', width: input.width, height: input.height, rowBytes: input.width * 2 }, bytes: input.data }
    case 'v210':
      return { layout: { kind: 'v210', width: input.width, height: input.height, rowBytes: v210Stride(input.width) }, bytes: input.data }
    default:
      throw new FrameLinesError(`line data is not stored for ${input.kind} input`)
  }
}

/** The frame's line data object (the worker writes it beside the scope images). */
export function encodeFrameLines(input: FrameInput, into?: (bytes: number) => Uint8Array): Uint8Array {
  const { layout, bytes } = layoutOf(input)
  const json = new TextEncoder().encode(JSON.stringify({ ...layout, littleEndian: true }))
  if (8 + json.length > HEADER_BYTES) throw new FrameLinesError('line data header does not fit')
  const size = layout.rowBytes * layout.height
  // Into the caller's buffer when given (a worker thread's, reused job after job); the header
  // block is written whole, so nothing of the buffer's last use stays.
  const out = into ? into(HEADER_BYTES + size) : new Uint8Array(HEADER_BYTES + size)
  if (into) out.fill(0, 0, HEADER_BYTES)
  out.set(new TextEncoder().encode(MAGIC), 0)
  new DataView(out.buffer).setUint32(4, json.length, true)
  out.set(json, 8)
  out.set(bytes.subarray(0, size), HEADER_BYTES)
  return out
}

/** Line n of the stored line data as a one-line engine input (n counts from the top, 0 first). */
export async function readFrameLine(storage: Pick<Storage, 'getRange'>, key: string, n: number): Promise<FrameInput> {
  const head = await storage.getRange(key, 0, HEADER_BYTES)
  if (new TextDecoder().decode(head.subarray(0, 4)) !== MAGIC) throw new FrameLinesError('not line data')
  const length = new DataView(head.buffer, head.byteOffset, head.byteLength).getUint32(4, true)
  const layout = JSON.parse(new TextDecoder().decode(head.subarray(8, 8 + length))) as LineLayout & { littleEndian: boolean }
  if (!Number.isInteger(n) || n < 0 || n >= layout.height) throw new FrameLinesError(`line ${n} is outside the picture (0…${layout.height - 1})`)
  const at = HEADER_BYTES + n * layout.rowBytes
  // A fresh copy: its buffer starts at offset 0, as a Uint16Array view needs.
  const row = new Uint8Array(await storage.getRange(key, at, at + layout.rowBytes))
  if (row.length !== layout.rowBytes) throw new FrameLinesError(`line ${n} holds ${row.length} bytes, ${layout.rowBytes} expected`)
  if (layout.kind === 'rgb') {
    if (layout.bitDepth === 16 && !layout.littleEndian) throw new FrameLinesError('16-bit line data in an unknown byte order')
    const data = layout.bitDepth === 16 ? new Uint16Array(row.buffer, 0, row.length / 2) : row
    return { kind: 'rgb', data, width: layout.width, height: 1, channels: layout.channels, bitDepth: layout.bitDepth, range: layout.range }
  }
  return { kind: layout.kind, data: row, width: layout.width, height: 1 }
}
