// Who hears about what, and the words they read: the uploader of rejected frames (once per
// decision batch, and only while still in the team: a link they cannot open helps nobody),
// and the team's producers when a reel is signed off. Routes add the link and queue the mail.
import { and, eq, inArray, ne } from 'drizzle-orm'
import type { DbOrTx } from '../db/client'
import * as t from '../db/schema'
import { ENGINE_VERSION } from '../../shared/engine'
import { frameList, OVERALL_LABELS, type SheetSummary } from './sheet-rules'


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

export async function rejectionNotices(db: DbOrTx, args: { teamId: number; frameIds: number[]; deciderId: number }): Promise<RejectionNotice[]> {
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

/** The team's producers, who receive the sheet when a reel is signed off. */
export async function producersOf(db: DbOrTx, teamId: number): Promise<{ email: string, name: string }[]> {
  return db.select({ email: t.users.email, name: t.users.name }).from(t.memberships)
    .innerJoin(t.users, eq(t.users.id, t.memberships.userId))
    .where(and(eq(t.memberships.teamId, teamId), eq(t.memberships.role, 'producer')))
}

/** The words of a sign-off mail to one producer; it names the spec and engine that measured the reel. */
export function signoffMailText(to: { email: string, name: string }, a: {
  signerName: string, reelName: string, productionName: string, summary: SheetSummary, frames: number, specTitle: string, specVersion: number
}) {
  return {
    to: to.email,
    subject: `Signed off: ${a.productionName} — ${a.reelName}`,
    lines: [
      `Hello ${to.name},`,
      `${a.signerName} signed off the reel "${a.reelName}" of ${a.productionName}.`,
      `Overall result: ${OVERALL_LABELS[a.summary.overall]} (${a.summary.because}; ${a.frames} frame${a.frames === 1 ? '' : 's'}).`,
      `Measured against ${a.specTitle}, version ${a.specVersion}, by Linewise engine ${ENGINE_VERSION}. The measurement is an aid: the broadcaster's own QC and spec take precedence.`,
      'The PDF and CSV of the pass/fail sheet are on the sheet page.',
    ],
    action: 'Open the pass/fail sheet',
  }
}
