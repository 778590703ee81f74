// The worker reads the same NUXT_* variables as the Nitro server.
function need(name: string) {
  const v = process.env[name]
  if (!v) throw new Error(`${name} is not set`)
  return v
}

export function workerEnv() {
  return {
    databaseUrl: need('NUXT_DATABASE_URL'),
    redisUrl: need('NUXT_REDIS_URL'),
    smtpUrl: need('NUXT_SMTP_URL'),
    mailFrom: process.env.NUXT_MAIL_FROM ?? 'Linewise <no-reply@linewise.local>',
    concurrency: Number(process.env.LW_WORKER_CONCURRENCY ?? 0) || undefined,
  }
}
