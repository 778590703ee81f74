// Analysis progress and when the reel page polls (counts as GET /api/reels/:id answers them).
import { describe, expect, it } from 'vitest'
import { analysisProgress, needsPolling, percentText } from '../../../app/utils/reel-progress'

const counts = (c: Partial<{ total: number; queued: number; analysing: number; done: number; failed: number }>) =>
  ({ total: 0, queued: 0, analysing: 0, done: 0, failed: 0, ...c })

describe('reel progress', () => {
  it('counts done and failed frames as finished', () => {
    expect(analysisProgress(counts({ total: 10, queued: 3, analysing: 2, done: 4, failed: 1 }))).toEqual({ finished: 5, total: 10, share: 0.5, pending: 5 })
    expect(analysisProgress(counts({ total: 3, done: 3 }))).toEqual({ finished: 3, total: 3, share: 1, pending: 0 })
  })

  it('counts files still being sent as frames to come, so an upload never reads 100 %', () => {
    expect(analysisProgress(counts({}), 6)).toEqual({ finished: 0, total: 6, share: 0, pending: 6 })
    expect(analysisProgress(counts({ total: 2, done: 2 }), 2)).toEqual({ finished: 2, total: 4, share: 0.5, pending: 2 })
  })

  it('treats an empty or unknown reel as having nothing to wait for', () => {
    expect(analysisProgress(counts({}))).toEqual({ finished: 0, total: 0, share: 1, pending: 0 })
    expect(analysisProgress(null).pending).toBe(0)
  })

  it('polls while frames are queued or being analysed, or while files are still being sent', () => {
    expect(needsPolling(counts({ total: 2, queued: 1, done: 1 }))).toBe(true)
    expect(needsPolling(counts({ total: 2, analysing: 1, done: 1 }))).toBe(true)
    expect(needsPolling(counts({ total: 2, done: 1, failed: 1 }))).toBe(false)
    expect(needsPolling(counts({ total: 0 }), true)).toBe(true)
    expect(needsPolling(undefined)).toBe(false)
  })

  it('never rounds an unfinished reel up to 100 %', () => {
    expect(percentText(0)).toBe('0 %')
    expect(percentText(0.5)).toBe('50 %')
    expect(percentText(999 / 1000)).toBe('99 %')
    expect(percentText(1)).toBe('100 %')
  })
})
