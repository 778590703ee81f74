// The frames table's state ↔ the address and the API query of GET /api/reels/:id/frames
// (the server's zod schema in server/api/reels/[id]/frames.get.ts is the contract).
import { describe, expect, it } from 'vitest'
import {
  DEFAULT_FRAME_LIST, frameListApiQuery, frameListFromQuery, frameListToQuery, pageCount, pageRangeText,
  sortingFromState, stateFromSorting, withFilter,
} from '../../../app/utils/frame-query'

describe('frames table state', () => {
  it('reads an empty address as the default view, and writes the default view as an empty address', () => {
    expect(frameListFromQuery({})).toEqual(DEFAULT_FRAME_LIST)
    expect(frameListToQuery({ ...DEFAULT_FRAME_LIST })).toEqual({})
  })

  it('round-trips every filter, sort and page through the address', () => {
    const s = { page: 3, pageSize: 100, status: 'done', verdict: 'fail', decision: 'none', q: 'B012', sort: 'lumaMax', dir: 'desc' } as const
    const q = frameListToQuery(s)
    expect(q).toEqual({ page: '3', size: '100', status: 'done', verdict: 'fail', decision: 'none', q: 'B012', sort: 'lumaMax', dir: 'desc' })
    expect(frameListFromQuery(q)).toEqual(s)
  })

  it('falls back to the default for anything unknown or malformed, instead of sending it to the server', () => {
    const s = frameListFromQuery({ page: '-2', size: '37', status: 'lost', verdict: 'PASS', decision: 'maybe', sort: 'DROP TABLE', dir: 'sideways', q: ['x', 'y'] })
    expect(s).toEqual({ ...DEFAULT_FRAME_LIST, q: 'x' })
    expect(frameListFromQuery({ page: '2.5' }).page).toBe(1)
    expect(frameListFromQuery({ q: 'a'.repeat(150) }).q).toHaveLength(100)
  })

  it('sends only the filters that are set, with the search trimmed', () => {
    expect(frameListApiQuery({ ...DEFAULT_FRAME_LIST })).toEqual({ page: 1, pageSize: 50, sort: 'seq', dir: 'asc' })
    expect(frameListApiQuery({ ...DEFAULT_FRAME_LIST, verdict: 'caution', decision: 'waived', q: '  cam b  ' }))
      .toEqual({ page: 1, pageSize: 50, sort: 'seq', dir: 'asc', verdict: 'caution', decision: 'waived', q: 'cam b' })
    expect(frameListApiQuery({ ...DEFAULT_FRAME_LIST, q: '   ' })).not.toHaveProperty('q')
  })

  it('starts again at page 1 when a filter or the sort changes', () => {
    const s = { ...DEFAULT_FRAME_LIST, page: 9 }
    expect(withFilter(s, { verdict: 'fail' })).toEqual({ ...DEFAULT_FRAME_LIST, verdict: 'fail', page: 1 })
    expect(withFilter(s, { sort: 'name', dir: 'desc' }).page).toBe(1)
  })

  it('maps TanStack sorting to the server sort key and back', () => {
    expect(sortingFromState({ sort: 'compMax', dir: 'desc' })).toEqual([{ id: 'compMax', desc: true }])
    expect(stateFromSorting([{ id: 'outShare', desc: false }])).toEqual({ sort: 'outShare', dir: 'asc' })
    // Sorting cleared (a third click) or on a column the server cannot sort: back to frame order.
    expect(stateFromSorting([])).toEqual({ sort: 'seq', dir: 'asc' })
    expect(stateFromSorting([{ id: 'thumb', desc: true }])).toEqual({ sort: 'seq', dir: 'asc' })
  })

  it('counts pages and describes the rows shown', () => {
    expect(pageCount(0, 50)).toBe(1)
    expect(pageCount(50, 50)).toBe(1)
    expect(pageCount(51, 50)).toBe(2)
    expect(pageCount(4321, 100)).toBe(44)
    expect(pageRangeText(1, 50, 0)).toBe('0 of 0')
    expect(pageRangeText(1, 50, 7)).toBe('1–7 of 7')
    expect(pageRangeText(2, 50, 1234)).toBe('51–100 of 1,234')
    expect(pageRangeText(25, 50, 1234)).toBe('1,201–1,234 of 1,234')
  })
})
