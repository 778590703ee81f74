// One clip measured the way a chunk worker measures it (probe, ffmpeg pipe, engine per
// frame), in a process of its own so that its peak RSS is the worker's. Prints JSON.
import { statSync } from 'node:fs'
import { builtinSpec } from '../../shared/engine/specs'
import { defaultEngineThreads, measureFrames } from '../../workers/clips/measure'
import { probeClip } from '../../server/lib/clips/probe'

async function main() {
  const file = process.argv[2]!
  const probe = await probeClip(file, statSync(file).size)
  const t0 = performance.now()
  const r = await measureFrames({ input: file, probe, start: 0, count: probe.frameCount, matrix: probe.matrixTag ?? '709', rgbRange: 'full', spec: builtinSpec('ntsc-setup')!, threads: 2, engineThreads: Number(process.env.LW_CLIP_ENGINE_THREADS ?? defaultEngineThreads()) })
  const wallMs = performance.now() - t0
  const cpu = process.cpuUsage()
  console.log(JSON.stringify({ frames: r.measured, wallMs, engineCpuMs: (cpu.user + cpu.system) / 1000, maxRssMB: process.resourceUsage().maxRSS / 1024 }))
}
void main()
