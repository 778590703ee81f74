// Where one frame's time goes inside the analyse job, step by step, on one thread:
// decode, engine, each rendered image, PNG/JPEG encoding. S3 and MariaDB are left out
// (the pipeline benchmark measures them in place). Run: npx tsx tests/bench/pipeline-steps.ts
import sharp from 'sharp'
import { analyseFrame, builtinSpec, DEFAULT_SPEC_NAME, renderRangeOverlay, renderVectorscope, renderWaveform } from '../../shared/engine/index'
import type { RgbaImage } from '../../shared/engine/types'
import { decodeBytes } from '../../workers/lib/decode-file'
import { framePixels, HEIGHT, WIDTH } from './pipeline-frames.mjs'

const ROUNDS = Number(process.env.ROUNDS ?? 5)
const LEVEL = Number(process.env.PNG_LEVEL ?? 2)
const spec = builtinSpec(DEFAULT_SPEC_NAME)!
const times = new Map<string, number[]>()
async function step<T>(name: string, f: () => T | Promise<T>): Promise<T> {
  const t = performance.now()
  const r = await f()
  times.set(name, [...(times.get(name) ?? []), performance.now() - t])
  return r
}
const png = (img: RgbaImage, maxWidth?: number) => {
  let s = sharp(Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength), { raw: { width: img.width, height: img.height, channels: 4 } })
  if (maxWidth && img.width > maxWidth) s = s.resize({ width: maxWidth })
  return s.png({ compressionLevel: LEVEL }).toBuffer()
}

const sizes = new Map<string, number>()
for (let i = 0; i < ROUNDS + 1; i++) {
  const bytes = await sharp(framePixels(i), { raw: { width: WIDTH, height: HEIGHT, channels: 3 } }).png().toBuffer()
  if (i === 0) times.clear()
  const input = await step('decode', () => decodeBytes(bytes, { range: 'full' }))
  const a = await step('engine', () => analyseFrame(input, { matrix: '601', spec, keepDensities: true }))
  const thumb = await step('thumb (decode+resize+jpeg)', () => sharp(bytes).resize({ width: 320 }).jpeg({ quality: 80 }).toBuffer())
  const ov = await step('overlay render', () => renderRangeOverlay(input, spec, { matrix: '601' }))
  const ovp = await step('overlay png', () => png(ov, 1280))
  const imgs: Record<string, RgbaImage> = {}
  for (const m of ['luma', 'flat', 'rgb'] as const) imgs[`waveform-${m}`] = await step(`waveform-${m} render`, () => renderWaveform(a.waveform!, m))
  imgs.vectorscope = await step('vectorscope render', () => renderVectorscope(a.vectorscope!, { matrix: '601' }))
  const outs: Record<string, Buffer> = { thumb, overlay: ovp }
  for (const [k, img] of Object.entries(imgs)) outs[k] = await step(`${k} png`, () => png(img))
  if (i === 1) {
    for (const [k, b] of Object.entries(outs)) sizes.set(k, b.length)
    sizes.set('(waveform size)', imgs['waveform-luma']!.width * 10000 + imgs['waveform-luma']!.height)
  }
}
let total = 0
console.log(`1080p frame, ${ROUNDS} rounds, PNG level ${LEVEL}, median ms:`)
for (const [k, v] of times) {
  const m = v.sort((a, b) => a - b)[v.length >> 1]!
  total += m
  console.log(`  ${k.padEnd(28)} ${m.toFixed(1).padStart(7)}`)
}
console.log(`  ${'total'.padEnd(28)} ${total.toFixed(1).padStart(7)}`)
console.log('output bytes:', Object.fromEntries(sizes))
