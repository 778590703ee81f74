import { MAIL_UI_URL } from './env'

export interface CaughtMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string }[]
  time: string
}

/** Waits until the SMTP catcher holds a message to `to` matching `subject` (newest first). */
export async function waitForMail(to: string, subject: RegExp, timeoutMs = 20_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs
  while (Date.now() < until) {
    const res = await fetch(`${MAIL_UI_URL()}/api/email`)
    const all = (await res.json()) as CaughtMail[]
    const hit = all.filter((m) => m.to.some((t) => t.address.toLowerCase() === to.toLowerCase()) && subject.test(m.subject))
      .sort((a, b) => b.time.localeCompare(a.time))[0]
    if (hit) return hit
    await new Promise((r) => setTimeout(r, 200))
  }
  throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`)
}

/** The first link into the app found in a message's text. */
export function linkIn(mail: CaughtMail, pathPrefix: string): string {
  const m = mail.text.match(new RegExp(`https?://[^\\s]+${pathPrefix.replace(/[/?]/g, '\\$&')}[^\\s]*`))
  if (!m) throw new Error(`no ${pathPrefix} link in mail "${mail.subject}"`)
  return m[0]
}
