import type { H3Event } from 'h3'

/**
 * Answers without reading the rest of an oversized body: the response says
 * `Connection: close`, and once it has gone out the socket is closed, so the unread bytes
 * are never read. The socket is taken now and closed on the next turn of the event loop:
 * listeners of the server's own (Nitro's graceful shutdown marks the socket idle on
 * 'finish') still see it whole.
 */
export function closeConnectionAfterAnswer(event: H3Event) {
  setResponseHeader(event, 'Connection', 'close')
  const socket = event.node.req.socket
  event.node.res.once('finish', () => setImmediate(() => socket?.destroy()))
}
