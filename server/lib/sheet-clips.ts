// The clips of a reel as the pass/fail sheet lists them: each clip with its duration, start
// timecode and events (timecode in/out, limits with their worst values, the decision and
// note on the event's frame). Plain module for the routes and the sheet worker alike.
import { asc, eq, inArray } from 'drizzle-orm'
import type { Db } from '../db/client'
import * as t from '../db/schema'
import type { LimitWorst } from '../../shared/utils/clip-timeline'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

export interface SheetClipEvent {
  seq: number
  tcIn: string
  tcOut: string
  frames: number
  verdict: 'fail' | 'caution'
  /** "Luma above 100 IRE: 106.3 IRE" for each limit broken. */
  limits: string[]
  frameId: number | null
  decision: string | null
  note: string
}

export interface SheetClip {
  id: number
  name: string
  status: string
  startTimecode: string | null
  startTimecodeFound: boolean
  frames: number | null
  durationS: number | null
  fps: number | null
  dropFrame: boolean
  truncated: boolean
  note: string | null
  failReason: string | null
  events: SheetClipEvent[]
}

const UNIT: Record<string, string> = { ire: ' IRE', ire0: ' IRE', mv: ' mV', mvNtsc: ' mV', pct: ' %', code8: '', code10: '' }
export const limitText = (l: LimitWorst) => `${l.label}: ${l.value.toFixed(l.unit.startsWith('code') ? 0 : 1)}${UNIT[l.unit] ?? ''}${l.unit.startsWith('code') ? ` (${l.unit === 'code8' ? '8' : '10'}-bit code)` : ''}`

export async function loadSheetClips(db: Db | Tx, reelId: number): Promise<SheetClip[]> {
  const clips = await db.select().from(t.clips).where(eq(t.clips.reelId, reelId)).orderBy(asc(t.clips.id))
  const shown = clips.filter((c) => c.status !== 'uploading')
  if (!shown.length) return []
  const events = await db.select({ e: t.clipEvents, decision: t.decisions.decision, note: t.decisions.note }).from(t.clipEvents)
    .leftJoin(t.decisions, eq(t.decisions.frameId, t.clipEvents.frameId))
    .where(inArray(t.clipEvents.clipId, shown.map((c) => c.id))).orderBy(asc(t.clipEvents.clipId), asc(t.clipEvents.seq))
  return shown.map((c) => {
    const frames = c.framesMeasured ?? c.frameCount
    return {
      id: c.id, name: c.name, status: c.status, startTimecode: c.startTimecode, startTimecodeFound: c.startTimecodeFound, frames,
      durationS: frames && c.fpsNum && c.fpsDen ? (frames * c.fpsDen) / c.fpsNum : null, fps: c.fpsNum && c.fpsDen ? c.fpsNum / c.fpsDen : null,
      dropFrame: c.dropFrame, truncated: c.truncated, note: c.note, failReason: c.failReason,
      events: events.filter((x) => x.e.clipId === c.id).map(({ e, decision, note }) => ({
        seq: e.seq, tcIn: e.tcIn, tcOut: e.tcOut, frames: e.endFrame - e.startFrame + 1, verdict: e.verdict,
        limits: (e.limits as LimitWorst[]).map(limitText), frameId: e.frameId, decision: decision ?? null, note: note ?? '',
      })),
    }
  })
}

/** A reel is not signed while a clip of it is still being measured: its events are not known yet. */
export function clipBlockers(clips: SheetClip[]) {
  const busy = clips.filter((c) => ['queued', 'probing', 'measuring', 'merging'].includes(c.status))
  return busy.length
    ? [{ code: 'clips-measuring', message: `${busy.length} clip(s) still being measured (${busy.map((c) => c.name).slice(0, 3).join(', ')})`, frameIds: [] as number[] }]
    : []
}
