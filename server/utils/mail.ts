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

/**
 * Plain text plus a small HTML version with one button; all user text escaped. The HTML is a
 * whole document that declares UTF-8 itself: a viewer that serves the part without its MIME
 * charset (a mail catcher's HTML view, a saved file) still shows "—" and accents as written.
 */
export function mailWithLink(opts: { to: string; subject: string; lines: string[]; link: string; action: string }): MailJob {
  const text = [...opts.lines, '', `${opts.action}: ${opts.link}`, '', '— Linewise'].join('\n')
  const body = `<div style="font-family:sans-serif;font-size:14px;line-height:1.5">${opts.lines.map((l) => `<p>${escape(l)}</p>`).join('')}`
    + `<p><a href="${escape(opts.link)}" style="display:inline-block;padding:8px 14px;background:#1f8f87;color:#fff;border-radius:6px;text-decoration:none">${escape(opts.action)}</a></p>`
    + `<p style="color:#666">Or open this address: ${escape(opts.link)}</p><p style="color:#666">— Linewise</p></div>`
  return { to: opts.to, subject: opts.subject, text, html: htmlDocument(opts.subject, body) }
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

/** An HTML mail body as a complete document with its charset declared. */
export function htmlDocument(title: string, body: string): string {
  // A viewer that keeps only the body, or saves the part without its MIME charset, still shows
  // "—" as "—": every character beyond ASCII is written as a character reference.
  return asciiOnly(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta http-equiv="Content-Type" content="text/html; charset=utf-8"><title>${escape(title)}</title></head><body>${body}</body></html>`)
}

const asciiOnly = (html: string) => html.replace(/[\u0080-\u{10ffff}]/gu, (c) => `&#${c.codePointAt(0)};`)
