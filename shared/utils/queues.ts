// Queue names and job payloads shared by the Nitro server (producer) and the worker.
export const QUEUE_MAIL = 'mail'

export interface MailJob {
  to: string
  subject: string
  text: string
  html?: string
}

/** Retries with exponential backoff; finished jobs are trimmed so Redis stays small. */
export const DEFAULT_JOB_OPTIONS = {
  attempts: 5,
  backoff: { type: 'exponential', delay: 2000 },
  removeOnComplete: { age: 24 * 3600, count: 1000 },
  removeOnFail: { age: 7 * 24 * 3600 },
} as const

export const QUEUE_ANALYSE = 'analyse'

export interface AnalyseJob {
  frameId: number
}

/** One job id per frame: adding it twice while it waits is a no-op in BullMQ. */
export const analyseJobId = (frameId: number) => `frame-${frameId}`

export const QUEUE_SHEET = 'sheet'

export interface SheetJob {
  signoffId: number
}

/** One sheet per sign-off: a second add while the first waits or is kept is a no-op. */
export const sheetJobId = (signoffId: number) => `signoff-${signoffId}`
