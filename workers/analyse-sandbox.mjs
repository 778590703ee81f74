// The file BullMQ loads in each analysis worker thread. On Node 20 the `--import tsx` of
// the worker process does not reach worker threads (the thread fails with "Unknown file
// extension .ts"), so this plain module loads the TypeScript processor through tsx's API.
import { tsImport } from 'tsx/esm/api'

const { default: analyseInThread } = await tsImport('./analyse-sandbox.ts', import.meta.url)
export default analyseInThread
