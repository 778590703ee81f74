// Sends a clip to a reel: announce (the server answers with presigned part addresses), PUT
// the parts straight to S3 a few at a time with progress, send a failed part again on its own
// (up to three tries each), then complete: the server joins the parts, probes the clip and
// queues it, or refuses it with the reason.
import { CLIP_LIMITS } from '#shared/utils/clips'

export interface ClipSend {
  name: string
  size: number
  sent: number
  state: 'announcing' | 'sending' | 'completing' | 'queued' | 'refused'
  message: string
  retries: number
}

const PARALLEL = 3
const TRIES = 3

function putPart(url: string, blob: Blob, onProgress: (n: number) => void): Promise<string> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('PUT', url)
    xhr.upload.onprogress = (e) => onProgress(e.loaded)
    xhr.onload = () => {
      const etag = xhr.getResponseHeader('ETag')
      if (xhr.status >= 200 && xhr.status < 300 && etag) resolve(etag)
      else reject(new Error(`Storage answered ${xhr.status}`))
    }
    xhr.onerror = () => reject(new Error('The connection to storage failed'))
    xhr.send(blob)
  })
}

export function useClipUpload(reelId: number, onQueued: () => void) {
  const sends = ref<ClipSend[]>([])
  const busy = computed(() => sends.value.some((s) => s.state === 'announcing' || s.state === 'sending' || s.state === 'completing'))

  async function send(file: File) {
    const s = reactive<ClipSend>({ name: file.name, size: file.size, sent: 0, state: 'announcing', message: '', retries: 0 })
    sends.value.unshift(s as ClipSend)
    if (file.size > CLIP_LIMITS.maxBytes) {
      Object.assign(s, { state: 'refused', message: `The clip is larger than ${CLIP_LIMITS.maxBytes / 2 ** 30} GiB` })
      return
    }
    try {
      const a = await $fetch<{ clipId: number, partSize: number, parts: { partNumber: number, url: string }[] }>(`/api/reels/${reelId}/clip-uploads`, {
        method: 'POST', body: { name: file.name, size: file.size },
      })
      s.state = 'sending'
      const loaded = new Map<number, number>()
      const etags: { partNumber: number, etag: string }[] = []
      const queue = [...a.parts]
      const worker = async () => {
        for (let p = queue.shift(); p; p = queue.shift()) {
          const blob = file.slice((p.partNumber - 1) * a.partSize, p.partNumber * a.partSize)
          for (let attempt = 1; ; attempt++) {
            try {
              const etag = await putPart(p.url, blob, (n) => { loaded.set(p!.partNumber, n); s.sent = [...loaded.values()].reduce((x, y) => x + y, 0) })
              etags.push({ partNumber: p.partNumber, etag })
              break
            } catch (e) {
              loaded.set(p.partNumber, 0)
              if (attempt >= TRIES) throw new Error(`Part ${p.partNumber} failed ${TRIES} times: ${(e as Error).message}`)
              s.retries++
              await new Promise((r) => setTimeout(r, 1000 * attempt))
            }
          }
        }
      }
      await Promise.all(Array.from({ length: Math.min(PARALLEL, a.parts.length) }, worker))
      s.state = 'completing'
      s.sent = file.size
      await $fetch(`/api/clips/${a.clipId}/complete`, { method: 'POST', body: { parts: etags.sort((x, y) => x.partNumber - y.partNumber) } })
      Object.assign(s, { state: 'queued', message: 'Stored and queued for measurement' })
      onQueued()
    } catch (e) {
      const data = (e as { data?: { reason?: string, statusMessage?: string } }).data
      Object.assign(s, { state: 'refused', message: data?.reason ?? data?.statusMessage ?? (e as Error).message })
      onQueued()
    }
  }

  return { sends, busy, send }
}
