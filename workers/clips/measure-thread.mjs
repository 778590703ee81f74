// The file each engine thread of measureFrames loads. On Node 20 the `--import tsx` of the
// worker process does not reach worker threads (see workers/analyse-sandbox.mjs), so this
// plain module loads the TypeScript through tsx's API.
import { tsImport } from 'tsx/esm/api'

await tsImport('./measure-thread.ts', import.meta.url)
