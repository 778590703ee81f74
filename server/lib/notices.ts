// Who hears about rejected frames: the person who uploaded them, once per decision batch,
// and only while they are still in the team (a link they cannot open helps nobody).
import { and, eq, inArray, ne } from 'drizzle-orm'
import type { Db } from '../db/client'
import * as t from '../db/schema'
import { frameList } from './sheet-rules'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

export interface RejectionNotice {
  to: string
  name: string
  reelId: number
  reelName: string
  productionName: string
  frames: { seq: number; name: string }[]
  /** "#4 a.png, #9 b.png" */
  list: string
}

export async function rejectionNotices(db: Db | Tx, args: { teamId: number; frameIds: number[]; deciderId: number }): Promise<RejectionNotice[]> {
  if (!args.frameIds.length) return []
  const rows = await db.select({
    seq: t.frames.seq, name: t.frames.name, reelId: t.reels.id, reelName: t.reels.name, productionName: t.productions.name,
    userId: t.users.id, email: t.users.email, userName: t.users.name,
  }).from(t.frames)
    .innerJoin(t.reels, eq(t.reels.id, t.frames.reelId))
    .innerJoin(t.productions, eq(t.productions.id, t.reels.productionId))
    .innerJoin(t.users, eq(t.users.id, t.frames.uploadedBy))
    .innerJoin(t.memberships, and(eq(t.memberships.userId, t.users.id), eq(t.memberships.teamId, t.frames.teamId)))
    // Someone rejecting their own upload knows already.
    .where(and(eq(t.frames.teamId, args.teamId), inArray(t.frames.id, args.frameIds), ne(t.users.id, args.deciderId)))
  const byPerson = new Map<string, RejectionNotice>()
  for (const r of rows) {
    const key = `${r.userId}/${r.reelId}`
    let n = byPerson.get(key)
    if (!n) {
      n = { to: r.email, name: r.userName, reelId: r.reelId, reelName: r.reelName, productionName: r.productionName, frames: [], list: '' }
      byPerson.set(key, n)
    }
    n.frames.push({ seq: r.seq, name: r.name })
  }
  return [...byPerson.values()].map((n) => ({ ...n, frames: n.frames.sort((a, b) => a.seq - b.seq), list: frameList(n.frames) }))
}

/** The words of a rejection mail (the route adds the link and queues it). */
export function rejectionMailText(n: RejectionNotice, args: { note: string; deciderName: string }) {
  const count = n.frames.length
  return {
    to: n.to,
    subject: `${count === 1 ? 'A frame was' : `${count} frames were`} rejected: ${n.productionName} — ${n.reelName}`,
    lines: [
      `Hello ${n.name},`,
      `${args.deciderName} rejected ${count === 1 ? 'a frame' : `${count} frames`} you uploaded to the reel "${n.reelName}" of ${n.productionName}: ${n.list}.`,
      `Note: ${args.note}`,
    ],
    action: 'Open the reel',
  }
}
