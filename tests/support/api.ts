import { APP_URL } from './env'

export interface ApiResponse<T = any> {
  status: number
  body: T
  headers: Headers
}

export interface UploadResult { name: string; ok: boolean; frameId?: number; duplicate?: boolean; queued?: boolean; status?: number; reason?: string }

/** A tiny HTTP client with its own cookie jar: one instance is one signed-in browser. */
export class Client {
  private cookies = new Map<string, string>()

  /** With a token, the client is a script: it sends `Authorization: Bearer …` and no cookie. */
  constructor(readonly bearer?: string) {}

  private authHeaders(): Record<string, string> {
    if (this.bearer) return { authorization: `Bearer ${this.bearer}` }
    return this.cookies.size ? { cookie: this.cookieHeader() } : {}
  }

  async request<T = any>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<ApiResponse<T>> {
    const res = await fetch(new URL(path, APP_URL()), {
      method,
      headers: {
        ...(body !== undefined ? { 'content-type': 'application/json' } : {}),
        ...this.authHeaders(),
        ...headers,
      },
      body: body !== undefined ? JSON.stringify(body) : undefined,
      redirect: 'manual',
    })
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      const k = pair!.slice(0, i)
      const v = pair!.slice(i + 1)
      if (v === '' || /max-age=0|expires=thu, 01 jan 1970/i.test(c)) this.cookies.delete(k)
      else this.cookies.set(k, v)
    }
    const text = await res.text()
    let parsed: unknown = text
    try { parsed = text ? JSON.parse(text) : null } catch { /* not JSON */ }
    return { status: res.status, body: parsed as T, headers: res.headers }
  }

  /** The Cookie header this client sends, for requests made with plain fetch (multipart, images). */
  cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  /** multipart/form-data upload of files to a reel, as a script would send it. */
  async uploadFrames(reelId: number, files: { name: string; bytes: Uint8Array }[], query = '') {
    const form = new FormData()
    for (const f of files) form.append('file', new Blob([f.bytes as BlobPart]), f.name)
    const res = await fetch(new URL(`/api/reels/${reelId}/frames${query}`, APP_URL()), { method: 'POST', body: form, headers: this.authHeaders() })
    const text = await res.text()
    let body: any = text
    try { body = JSON.parse(text) } catch { /* not JSON */ }
    return { status: res.status, body: body as { files: UploadResult[] } & { statusMessage?: string } }
  }

  get<T = any>(path: string) { return this.request<T>('GET', path) }
  post<T = any>(path: string, body?: unknown) { return this.request<T>('POST', path, body ?? {}) }
  patch<T = any>(path: string, body?: unknown) { return this.request<T>('PATCH', path, body ?? {}) }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path) }
  put<T = any>(path: string, body?: unknown) { return this.request<T>('PUT', path, body ?? {}) }

  async login(email: string, password: string) {
    const r = await this.post('/api/auth/login', { email, password })
    if (r.status !== 200) throw new Error(`sign-in as ${email} failed: ${r.status} ${JSON.stringify(r.body)}`)
    return this
  }
}

export const signedIn = (email: string, password: string) => new Client().login(email, password)
