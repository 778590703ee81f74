const LOCALE = 'en-GB'

/**
 * Server and browser may sit in different time zones; rendering the server's pass in UTC and
 * switching to local time after mount keeps hydration identical.
 */
export function formatDateTime(value: string | Date | null | undefined, local: boolean): string {
  if (!value) return '—'
  const d = typeof value === 'string' ? new Date(value) : value
  if (Number.isNaN(d.getTime())) return '—'
  const text = new Intl.DateTimeFormat(LOCALE, {
    day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit',
    ...(local ? {} : { timeZone: 'UTC' }),
  }).format(d)
  return local ? text : `${text} UTC`
}

export function formatDate(value: string | Date | null | undefined, local: boolean): string {
  if (!value) return '—'
  const d = typeof value === 'string' ? new Date(value) : value
  if (Number.isNaN(d.getTime())) return '—'
  return new Intl.DateTimeFormat(LOCALE, { day: 'numeric', month: 'short', year: 'numeric', ...(local ? {} : { timeZone: 'UTC' }) }).format(d)
}
