// Sending frames from the browser straight to storage: announce the files to the server (which
// answers with presigned addresses), PUT the bytes with XMLHttpRequest for progress events, a
// few files at a time, then ask the server to check and queue each one. Every file ends in a
// state a person can see: queued, duplicate, refused with a reason, or failed with a Retry.
import type { MaybeRefOrGetter } from 'vue'
import type { FrameFormat } from '#shared/utils/uploads'
import {
  checkRawFile, checkRawSize, checkUploadFile, completeOutcome, inBatches, partRanges, tallyUploads,
  type RetryFrom, type UploadState,
} from '~/utils/upload-plan'

/** Enough to keep a connection busy without starving the page's own requests. */
const PARALLEL = 3
/**
 * Presigned addresses last an hour: announce only a little ahead of the senders, so that the
 * thousandth file of a long batch does not find its address expired.
 */
const ANNOUNCE_AHEAD = PARALLEL * 4

type Target = { url: string } | { partSize: number; parts: { partNumber: number; url: string }[] }

export interface UploadItem {
  key: number
  file: File
  name: string
  size: number
  format: FrameFormat | null
  raw: boolean
  rawWidth?: number
  rawHeight?: number
  state: UploadState
  /** Bytes confirmed or in flight, for the progress bars. */
  sent: number
  reason: string
  frameId: number | null
  uploadId: number | null
  target: Target | null
  etags: Record<number, string>
  retryFrom: RetryFrom | null
}

class SendError extends Error {
  constructor(message: string, public retryFrom: RetryFrom) {
    super(message)
  }
}

/** One PUT of one blob; resolves with the ETag storage answered (needed to join parts). */
function putBlob(url: string, blob: Blob, onProgress: (loaded: number) => void): Promise<string | null> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('PUT', url)
    xhr.upload.onprogress = (e) => onProgress(e.loaded)
    xhr.onload = () => {
      if (xhr.status >= 200 && xhr.status < 300) resolve(xhr.getResponseHeader('ETag'))
      // 403 from storage on a presigned address almost always means it expired.
      else reject(new SendError(`Storage answered ${xhr.status}${xhr.status === 403 ? ' (the upload address expired)' : ''}`, xhr.status === 403 ? 'announce' : 'send'))
    }
    xhr.onerror = () => reject(new SendError('The connection to storage failed', 'send'))
    xhr.onabort = () => reject(new SendError('Sending was stopped', 'send'))
    xhr.send(blob)
  })
}

const naturalOrder = new Intl.Collator('en', { numeric: true, sensitivity: 'base' })

export function useFrameUpload(reelId: MaybeRefOrGetter<number>, hooks: { onQueued?: () => void } = {}) {
  const items = ref<UploadItem[]>([])
  let nextKey = 1
  let announcing = false
  let active = 0

  const tally = computed(() => tallyUploads(items.value))
  const busy = computed(() => items.value.some((i) => i.state === 'waiting' || i.state === 'sending' || i.state === 'checking'))
  const waitingForSize = computed(() => items.value.filter((i) => i.state === 'needs-size'))

  function item(partial: Pick<UploadItem, 'file' | 'name' | 'size'> & Partial<UploadItem>): UploadItem {
    return {
      key: nextKey++, format: null, raw: false, state: 'waiting', sent: 0, reason: '', frameId: null,
      uploadId: null, target: null, etags: {}, retryFrom: null, ...partial, file: markRaw(partial.file),
    }
  }

  /** Adds files (from a drop or a picker); files that cannot go are listed as refused at once. */
  function add(files: File[], unreadable: { name: string; reason: string }[] = []) {
    const sorted = [...files].sort((a, b) => naturalOrder.compare(a.name, b.name))
    for (const f of sorted) {
      const check = checkUploadFile(f)
      if (!check.ok) items.value.push(item({ file: f, name: f.name, size: f.size, state: 'refused', reason: check.reason }))
      else items.value.push(item({ file: f, name: f.name, size: f.size, format: check.format, raw: check.raw, state: check.raw ? 'needs-size' : 'waiting' }))
    }
    for (const u of unreadable) {
      items.value.push(item({ file: new File([], u.name), name: u.name, size: 0, state: 'refused', reason: u.reason }))
    }
    pump()
  }

  /** The width and height of every raw file still waiting for one; returns why not, if they cannot be used. */
  function applyRawSize(width: number, height: number): string | null {
    const problem = checkRawSize(width, height)
    if (problem) return problem
    for (const i of items.value) {
      if (i.state !== 'needs-size' || !i.raw) continue
      const mismatch = checkRawFile(i.format as 'uyvy' | 'v210', i.size, width, height)
      i.rawWidth = width
      i.rawHeight = height
      if (mismatch) Object.assign(i, { state: 'refused', reason: mismatch })
      else i.state = 'waiting'
    }
    pump()
    return null
  }

  function fail(i: UploadItem, reason: string, retryFrom: RetryFrom) {
    Object.assign(i, { state: 'failed', reason, retryFrom })
  }

  async function announce(batch: UploadItem[]) {
    const files = batch.map((i) => ({
      name: i.name, size: i.size, format: i.format!,
      ...(i.raw ? { rawWidth: i.rawWidth, rawHeight: i.rawHeight } : {}),
    }))
    try {
      const res = await $fetch<{ files: ({ ok: true; uploadId: number; url?: string; partSize?: number; parts?: { partNumber: number; url: string }[] } | { ok: false; reason: string })[] }>(
        `/api/reels/${toValue(reelId)}/uploads`, { method: 'POST', body: { files } })
      // The server answers file by file, in the order asked.
      batch.forEach((i, n) => {
        const a = res.files[n]
        if (!a) return fail(i, 'The server gave no answer for this file', 'announce')
        if (!a.ok) return Object.assign(i, { state: 'refused', reason: a.reason })
        i.uploadId = a.uploadId
        i.etags = {}
        i.target = a.url ? { url: a.url } : { partSize: a.partSize!, parts: a.parts! }
      })
    } catch (e) {
      // A refusal of the whole call (e.g. the reel was signed off) is final; anything else can be retried.
      const status = errorStatus(e)
      const reason = errorMessage(e, 'The server did not accept the files')
      for (const i of batch) {
        if (status >= 400 && status < 500 && status !== 408 && status !== 429) Object.assign(i, { state: 'refused', reason })
        else fail(i, reason, 'announce')
      }
    }
  }

  /** Sends the bytes: one PUT, or every part in turn; each PUT is tried twice before the file fails. */
  async function send(i: UploadItem) {
    const target = i.target!
    const twice = async <T>(attempt: () => Promise<T>): Promise<T> => {
      try {
        return await attempt()
      } catch (e) {
        if (e instanceof SendError && e.retryFrom === 'announce') throw e
        return await attempt()
      }
    }
    if ('url' in target) {
      i.sent = 0
      await twice(() => putBlob(target.url, i.file, (n) => { i.sent = n }))
      i.sent = i.size
      return
    }
    const ranges = partRanges(i.size, target.partSize, target.parts.map((p) => p.partNumber))
    const doneBytes = () => ranges.filter((r) => i.etags[r.partNumber]).reduce((s, r) => s + r.end - r.start, 0)
    for (const r of ranges) {
      if (i.etags[r.partNumber]) continue
      const url = target.parts.find((p) => p.partNumber === r.partNumber)!.url
      const etag = await twice(() => putBlob(url, i.file.slice(r.start, r.end), (n) => { i.sent = doneBytes() + n }))
      if (!etag) throw new SendError('Storage did not return the part\'s ETag (its CORS rule must expose the ETag header)', 'send')
      i.etags[r.partNumber] = etag
      i.sent = doneBytes()
    }
  }

  async function complete(i: UploadItem) {
    i.state = 'checking'
    const body = i.target && 'parts' in i.target
      ? { parts: Object.entries(i.etags).map(([n, etag]) => ({ partNumber: Number(n), etag })).sort((a, b) => a.partNumber - b.partNumber) }
      : {}
    let outcome
    try {
      const res = await $fetch.raw(`/api/reels/${toValue(reelId)}/uploads/${i.uploadId}/complete`, { method: 'POST', body, ignoreResponseError: true })
      outcome = completeOutcome({ status: res.status, body: res._data })
    } catch (e) {
      outcome = completeOutcome({ error: errorMessage(e, 'The server did not answer') })
    }
    if (outcome.state === 'queued' || outcome.state === 'duplicate') {
      Object.assign(i, { state: outcome.state, frameId: outcome.frameId, reason: '', retryFrom: null })
      hooks.onQueued?.()
    } else if (outcome.state === 'refused') {
      Object.assign(i, { state: 'refused', reason: outcome.reason, retryFrom: null })
    } else {
      fail(i, outcome.reason, outcome.retryFrom)
    }
  }

  // Frames are numbered in the order the server confirms them. Sends run in parallel, but each
  // confirmation waits for the one of the file before it, so a reel's index follows file-name order.
  let lastTurn: Promise<void> = Promise.resolve()

  async function transfer(i: UploadItem, release: () => void) {
    const previous = lastTurn
    let done!: () => void
    lastTurn = new Promise((resolve) => { done = resolve })
    try {
      i.state = 'sending'
      try {
        await send(i)
      } catch (e) {
        const retryFrom = e instanceof SendError ? e.retryFrom : 'send'
        return fail(i, (e as Error).message || 'Sending failed', retryFrom)
      } finally {
        // The sending slot is free once the bytes are out; waiting for a turn holds no connection.
        release()
      }
      i.state = 'checking'
      await previous
      await complete(i)
    } finally {
      done()
    }
  }

  function pump() {
    const ready = () => items.value.filter((i) => i.state === 'waiting' && i.target)
    const unannounced = items.value.filter((i) => i.state === 'waiting' && !i.target)
    if (!announcing && unannounced.length && ready().length < ANNOUNCE_AHEAD) {
      announcing = true
      void (async () => {
        try {
          await announce(inBatches(unannounced)[0]!)
        } finally {
          announcing = false
          pump()
        }
      })()
    }
    while (active < PARALLEL) {
      const next = ready()[0]
      if (!next) break
      active++
      // Marked before the await so that the next loop turn does not pick it again.
      next.state = 'sending'
      let released = false
      void transfer(next, () => {
        if (released) return
        released = true
        active--
        pump()
      })
    }
  }

  function retry(i: UploadItem) {
    if (i.state !== 'failed') return
    const from = i.retryFrom ?? 'send'
    i.reason = ''
    i.retryFrom = null
    if (from === 'complete') {
      void complete(i)
      return
    }
    if (from === 'announce') Object.assign(i, { target: null, uploadId: null, etags: {} })
    i.sent = 0
    i.state = 'waiting'
    pump()
  }

  function retryAll() {
    for (const i of items.value.filter((x) => x.state === 'failed')) retry(i)
  }

  /** Takes finished files off the list (only when asked: nothing leaves the list by itself). */
  function clearFinished() {
    items.value = items.value.filter((i) => !['queued', 'duplicate', 'refused'].includes(i.state))
  }

  return { items, tally, busy, waitingForSize, add, applyRawSize, retry, retryAll, clearFinished }
}
