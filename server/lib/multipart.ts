// A multipart/form-data body read as it arrives (busboy), one file part at a time. h3's
// readMultipartFormData buffers the whole body and then walks it byte by byte in
// JavaScript: about 3 MB/s and seconds of a blocked event loop for a batch of frames.
import type { IncomingMessage } from 'node:http'
import type { Readable } from 'node:stream'
import busboy from 'busboy'

export interface FilePart {
  /** The form field's name (scripts send `file`; any name is taken). */
  field: string
  /** The file name as sent, path included, so that a path can be refused rather than cut off. */
  filename: string
  /** The part's bytes; the handler must read it to its end. */
  stream: Readable
}

/** The body is not multipart/form-data, or it broke off; `files` parts had begun before that. */
export class MultipartError extends Error {
  constructor(message: string, public files: number) {
    super(message)
    this.name = 'MultipartError'
  }
}

/** The body went past the request's byte cap (declared or not): reading stopped there. */
export class BodyTooLargeError extends MultipartError {
  constructor(public limit: number, files: number) {
    super(`The request is larger than ${limit / 2 ** 20} MiB`, files)
    this.name = 'BodyTooLargeError'
  }
}

export const isMultipart = (contentType: string | undefined) => /^multipart\/form-data\s*;/i.test(contentType ?? '')

/**
 * Hands every file part of the request body to `onFile`, one after the other, each after
 * the previous call has settled. Until a part's stream is read the parser waits, and the
 * request with it: a slow consumer slows the sender down instead of filling memory.
 * Resolves once the body has been read to its end and the last call has settled. Rejects
 * with MultipartError when the body is malformed or breaks off (the stream of the part then
 * being read errors first), or with whatever `onFile` threw; either way the rest of the
 * request is read and dropped, so the connection stays usable for the answer and the next
 * request. Text fields are skipped.
 */
export function readMultipart(req: IncomingMessage, onFile: (part: FilePart) => Promise<void>, opts: { maxBytes?: number } = {}): Promise<void> {
  return new Promise((resolve, reject) => {
    let parser: busboy.Busboy
    try {
      parser = busboy({
        headers: req.headers,
        // Browsers and undici send names as UTF-8 within the quotes.
        defParamCharset: 'utf8',
        preservePath: true,
        limits: { fieldSize: 64 * 1024, fields: 1000, headerPairs: 100 },
      })
    } catch (e) {
      reject(new MultipartError((e as Error).message, 0))
      return
    }
    let files = 0
    let failure: Error | null = null
    let handlerFailed = false
    let chain = Promise.resolve()
    const fail = (e: Error) => {
      if (failure) return
      failure = e
      req.unpipe(parser)
      // Ends the part being read (its stream errors) and brings on 'close'; busboy reports
      // some malformed bodies by an 'error' event alone.
      parser.destroy()
      // Read the rest of the body and drop it: answering while it is still unread would
      // leave it in the socket for the next request to trip over. Past the byte cap the
      // rest is not read at all: the caller answers and closes the connection.
      if (e instanceof BodyTooLargeError) req.pause()
      else req.resume()
    }
    // A chunked body declares no length: it is held to the same cap by counting what arrives.
    if (opts.maxBytes) {
      const max = opts.maxBytes
      let received = 0
      const count = (chunk: Buffer) => {
        received += chunk.length
        if (received > max) {
          req.off('data', count)
          fail(new BodyTooLargeError(max, files))
        }
      }
      req.on('data', count)
    }
    parser.on('file', (field, stream, info) => {
      // A part with a file name, or one sent as application/octet-stream without one (as
      // a browser sends an empty file input): either way a file, answered on its own.
      files++
      // The parser errors a part it is cut off in, maybe before its turn comes: the reader
      // still sees that error, this only keeps it from counting as unhandled meanwhile.
      stream.on('error', () => {})
      chain = chain.then(async () => {
        // After a broken body the handler still gets the part, to answer it with its reason;
        // after the handler itself failed, the request is answered with that failure.
        if (handlerFailed) {
          stream.resume()
          return
        }
        await onFile({ field, filename: info.filename ?? '', stream })
      }).catch((e: Error) => {
        handlerFailed = true
        stream.resume()
        fail(e)
      })
    })
    parser.on('error', (e: Error) => fail(new MultipartError(e.message, files)))
    parser.on('close', () => {
      void chain.then(() => (failure ? reject(failure) : resolve()))
    })
    // A client that goes away mid-body: the part being read errors, then the parser.
    req.on('error', (e) => parser.destroy(e))
    req.on('aborted', () => parser.destroy(new Error('The connection closed before the request was complete')))
    req.pipe(parser)
  })
}
