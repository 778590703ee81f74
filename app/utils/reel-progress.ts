// Analysis progress of a reel from its counts; the reel page and the production overview
// read the same numbers the same way.

export interface StatusCounts { total: number; queued: number; analysing: number; done: number; failed: number }

export interface AnalysisProgress {
  /** Frames with a final state: measured, or failed with a reason. */
  finished: number
  total: number
  /** 0..1; an empty reel counts as complete (there is nothing left to wait for). */
  share: number
  pending: number
}

/**
 * `sending` counts files still on their way from this browser: they are frames to come, so
 * the share does not read 100 % while they travel.
 */
export function analysisProgress(c: StatusCounts | null | undefined, sending = 0): AnalysisProgress {
  const total = Math.max(0, c?.total ?? 0) + Math.max(0, sending)
  const finished = Math.min(total, (c?.done ?? 0) + (c?.failed ?? 0))
  return { finished, total, share: total ? finished / total : 1, pending: total - finished }
}

/** Live status is polled only while the worker still owes results (or the browser is still sending files). */
export function needsPolling(c: StatusCounts | null | undefined, uploading = false): boolean {
  return uploading || (c?.queued ?? 0) + (c?.analysing ?? 0) > 0
}

export function percentText(share: number): string {
  const p = Math.max(0, Math.min(1, share)) * 100
  // 99.6 % must not read as "100 %" while a frame is still waiting.
  return `${share < 1 && p > 99 ? 99 : Math.round(p)} %`
}
