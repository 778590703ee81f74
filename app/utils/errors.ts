import type { ZodError } from 'zod'

type Issue = { path?: PropertyKey[]; message?: string }

// h3 answers with its generic reason phrase in statusMessage when a handler throws a plain
// error (401 from requireUserSession, 500); the useful text is then in `message`.
const GENERIC = new Set(['Server Error', 'Internal Server Error', 'Bad Request', 'Unauthorized', 'Forbidden', 'Not Found', 'Validation Error', ''])

const FIELD_NAMES: Record<string, string> = {
  email: 'E-mail',
  password: 'Password',
  name: 'Name',
  role: 'Role',
  // The token's own message already says "This link is not valid".
  token: '',
  client: 'Client',
  teamId: 'Team',
  userId: 'Member',
  id: 'Id',
}

function issuesText(issues: Issue[]): string {
  return issues
    .map((i) => {
      const key = i.path?.length ? String(i.path[0]) : ''
      const field = key in FIELD_NAMES ? FIELD_NAMES[key] : key
      return field ? `${field}: ${i.message}` : (i.message ?? '')
    })
    .filter(Boolean)
    .join('; ')
}

function parseIssues(text: unknown): Issue[] | null {
  if (typeof text !== 'string' || !text.trimStart().startsWith('[')) return null
  try {
    const parsed = JSON.parse(text)
    return Array.isArray(parsed) ? parsed : null
  } catch {
    return null
  }
}

/** The status of a failed $fetch / useFetch, or 0 when the request never got an answer. */
export function errorStatus(e: unknown): number {
  const err = e as { statusCode?: number; status?: number; data?: { statusCode?: number } } | null
  return err?.data?.statusCode ?? err?.statusCode ?? err?.status ?? 0
}

/**
 * A sentence a person can act on, from whatever a failed request threw: the server's
 * statusMessage, a zod 400 turned into "Field: problem", or a network failure.
 */
export function errorMessage(e: unknown, fallback = 'Something went wrong. Try again.'): string {
  if (!e) return ''
  const err = e as { data?: Record<string, unknown>; statusMessage?: string; message?: string; statusCode?: number }
  const body = (err.data ?? {}) as { statusMessage?: string; message?: string; data?: { message?: string; issues?: Issue[] } }
  const issues = body.data?.issues ?? parseIssues(body.data?.message) ?? parseIssues(body.message)
  if (issues?.length) return issuesText(issues)
  for (const candidate of [body.statusMessage, body.message, err.statusMessage]) {
    if (candidate && !GENERIC.has(candidate) && !candidate.startsWith('[')) return candidate
  }
  if (!errorStatus(e)) return 'The server could not be reached. Check your connection and try again.'
  if (errorStatus(e) === 404) return 'Not found.'
  return fallback
}

/** First message per field, for showing beside each input. */
export function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = String(issue.path[0] ?? '_')
    out[key] ??= issue.message
  }
  return out
}

/** Any origin will do: only whether a value stays on it matters. */
const PROBE_ORIGIN = 'http://linewise.invalid'

/**
 * Only same-site paths, so a crafted ?redirect= cannot send someone elsewhere. The value is
 * resolved the way a browser would resolve it (which drops tabs and line breaks, turns `\`
 * into `/` and collapses `/./`), and kept only if it stays on this origin and does not start
 * with `//` afterwards; what is returned is that normalised path, never the raw value.
 */
export function safeRedirect(value: unknown, fallback = '/'): string {
  if (typeof value !== 'string' || !value.startsWith('/') || value.length > 2000) return fallback
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f\\]/.test(value)) return fallback
  let url: URL
  try {
    url = new URL(value, PROBE_ORIGIN)
  } catch {
    return fallback
  }
  if (url.origin !== PROBE_ORIGIN || url.pathname.startsWith('//')) return fallback
  return url.pathname + url.search + url.hash
}
