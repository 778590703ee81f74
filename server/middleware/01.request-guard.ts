// Checks every /api request makes before any route reads it:
// - state-changing requests from a browser must come from this site (Origin, else Referer):
//   SameSite=Lax alone let a cross-site form post create invitations and uploads;
// - JSON routes take JSON only: a form-encoded or text/plain body (what a cross-site form
//   can send without a CORS preflight) is refused;
// - a JSON body may be at most JSON_BODY_LIMIT bytes, counted as it arrives, whether the
//   length was declared or the body is chunked.
// Requests with `Authorization: Bearer` are scripts with an API token: no browser attaches
// that header on its own, so they are exempt from the Origin check.
import type { H3Event } from 'h3'

export const JSON_BODY_LIMIT = 128 * 1024
const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])
/** The routes that take multipart/form-data: stills and clips (each caps and streams its own body). */
const MULTIPART_ROUTE = /^\/api\/reels\/\d+\/(?:frames|clips)\/?$/

export function isSameSite(event: H3Event, appUrl: string): boolean {
  const origin = getRequestHeader(event, 'origin')
  const referer = getRequestHeader(event, 'referer')
  let from: string | null = null
  try {
    if (origin && origin !== 'null') from = new URL(origin).origin
    else if (origin === 'null') return false
    else if (referer) from = new URL(referer).origin
  } catch {
    return false
  }
  // Neither header: not a browser (browsers send Origin on every cross-site POST), so nothing to forge.
  if (from === null) return true
  const own = new Set([getRequestURL(event).origin])
  try { own.add(new URL(appUrl).origin) } catch { /* not configured */ }
  return own.has(from)
}

/**
 * Reads at most `limit` bytes of the body; past that the request is refused before more is
 * read. Listeners, not `for await`: leaving an async iterator early destroys the request
 * (and its socket) before the 413 can be sent.
 */
function readCapped(event: H3Event, limit: number): Promise<Buffer> {
  const req = event.node.req
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    const done = () => {
      req.off('data', onData)
      req.off('end', onEnd)
      req.off('error', onError)
    }
    const onData = (chunk: Buffer) => {
      size += chunk.length
      if (size <= limit) { chunks.push(chunk); return }
      done()
      req.pause()
      closeConnectionAfterAnswer(event)
      reject(tooLarge(limit))
    }
    const onEnd = () => { done(); resolve(Buffer.concat(chunks)) }
    const onError = (e: Error) => { done(); reject(e) }
    req.on('data', onData)
    req.on('end', onEnd)
    req.on('error', onError)
  })
}

const tooLarge = (limit: number) => createError({ statusCode: 413, statusMessage: `The request body is larger than ${limit / 1024} KiB` })

export default defineEventHandler(async (event) => {
  const path = event.path.split('?')[0]!
  if (!path.startsWith('/api/') || !UNSAFE.has(event.method)) return
  const bearer = getRequestHeader(event, 'authorization') !== undefined
  if (!bearer && !isSameSite(event, useRuntimeConfig(event).public.appUrl)) {
    throw createError({ statusCode: 403, statusMessage: 'This request came from another site and was refused' })
  }
  if (MULTIPART_ROUTE.test(path)) return
  const length = getRequestHeader(event, 'content-length')
  const chunked = getRequestHeader(event, 'transfer-encoding') !== undefined
  if (!chunked && (!length || Number(length) === 0)) return
  const type = (getRequestHeader(event, 'content-type') ?? '').split(';')[0]!.trim().toLowerCase()
  if (type !== 'application/json') {
    throw createError({ statusCode: 415, statusMessage: 'Send this request as JSON (Content-Type: application/json)' })
  }
  if (length && Number(length) > JSON_BODY_LIMIT) {
    closeConnectionAfterAnswer(event)
    throw tooLarge(JSON_BODY_LIMIT)
  }
  // h3's body readers use this buffer instead of reading the stream again.
  ;(event as unknown as { _requestBody?: Buffer })._requestBody = await readCapped(event, JSON_BODY_LIMIT)
})
