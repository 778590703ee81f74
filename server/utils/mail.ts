import { QUEUE_MAIL, type MailJob } from '../../shared/utils/queues'
import type { DbOrTx } from '../db/client'
import { rejectionMailText, rejectionNotices } from '../lib/notices'

/** Queues a message; the worker sends it and retries on SMTP faults. */
export async function queueMail(mail: MailJob) {
  await enqueue(QUEUE_MAIL, 'send', mail)
}

export function appUrl(path: string) {
  return new URL(path, useRuntimeConfig().public.appUrl).toString()
}

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`)

/** Plain text plus a small HTML version with one button; all user text escaped. */
export function mailWithLink(opts: { to: string; subject: string; lines: string[]; link: string; action: string }): MailJob {
  const text = [...opts.lines, '', `${opts.action}: ${opts.link}`, '', '— Linewise'].join('\n')
  const html = `<div style="font-family:sans-serif;font-size:14px;line-height:1.5">${opts.lines.map((l) => `<p>${escape(l)}</p>`).join('')}`
    + `<p><a href="${escape(opts.link)}" style="display:inline-block;padding:8px 14px;background:#1f8f87;color:#fff;border-radius:6px;text-decoration:none">${escape(opts.action)}</a></p>`
    + `<p style="color:#666">Or open this address: ${escape(opts.link)}</p><p style="color:#666">— Linewise</p></div>`
  return { to: opts.to, subject: opts.subject, text, html }
}

/**
 * One mail per uploader of the rejected frames (the single and the bulk decision). Called
 * inside the decision's transaction: with Redis down the decision is refused (503), never
 * saved unannounced.
 */
export async function queueRejectionMails(tx: DbOrTx, a: { teamId: number, frameIds: number[], decider: { id: number, name: string }, note: string }) {
  for (const n of await rejectionNotices(tx, { teamId: a.teamId, frameIds: a.frameIds, deciderId: a.decider.id })) {
    await queueMail(mailWithLink({ ...rejectionMailText(n, { note: a.note, deciderName: a.decider.name }), link: appUrl(`/reels/${n.reelId}`) }))
  }
}
