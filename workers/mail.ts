import type { Job } from 'bullmq'
import type { Transporter } from 'nodemailer'
import type { MailJob } from '../shared/utils/queues'

/** Sends one queued message. Throws on SMTP faults so BullMQ retries with backoff. */
export async function processMail(job: Pick<Job<MailJob>, 'data' | 'id'>, transport: Pick<Transporter, 'sendMail'>, from: string) {
  const { to, subject, text, html } = job.data
  const info = await transport.sendMail({ from, to, subject, text, html, messageId: job.id ? `<lw-${job.id}@linewise.local>` : undefined })
  return { messageId: info.messageId as string }
}
