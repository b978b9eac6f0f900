import { inject } from 'vitest'

export interface Reply<T = any> {
  status: number
  headers: Headers
  body: T
}

/** A tiny cookie-keeping client: one instance is one browser-like session. */
export class Client {
  cookies = new Map<string, string>()
  constructor(readonly baseUrl = inject('baseUrl')) {}

  get cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  async request<T = any>(path: string, init: RequestInit & { json?: unknown } = {}): Promise<Reply<T>> {
    const headers = new Headers(init.headers)
    if (this.cookies.size) headers.set('cookie', this.cookieHeader)
    let body = init.body
    if (init.json !== undefined) {
      headers.set('content-type', 'application/json')
      body = JSON.stringify(init.json)
    }
    const response = await fetch(new URL(path, this.baseUrl), { ...init, headers, body, redirect: 'manual' })
    for (const line of response.headers.getSetCookie()) {
      const [pair, ...attributes] = line.split(';')
      const [name, value] = [pair!.slice(0, pair!.indexOf('=')), pair!.slice(pair!.indexOf('=') + 1)]
      const expired = attributes.some((a) => /expires=Thu, 01 Jan 1970/i.test(a) || /max-age=0/i.test(a.trim()))
      if (expired || value === '') this.cookies.delete(name.trim())
      else this.cookies.set(name.trim(), value)
    }
    const text = await response.text()
    let parsed: unknown = text
    if (response.headers.get('content-type')?.includes('json') && text) parsed = JSON.parse(text)
    return { status: response.status, headers: response.headers, body: parsed as T }
  }

  get<T = any>(path: string, init: RequestInit = {}) {
    return this.request<T>(path, { ...init, method: 'GET' })
  }

  post<T = any>(path: string, json?: unknown, init: RequestInit = {}) {
    return this.request<T>(path, { ...init, method: 'POST', json })
  }

  async login(email: string, password = 'halocline-demo') {
    const reply = await this.post('/api/auth/login', { email, password })
    if (reply.status !== 200) throw new Error(`login ${email} failed: ${reply.status} ${JSON.stringify(reply.body)}`)
    return reply
  }

  /** A copy holding the same cookies: the same session used from a second place. */
  clone() {
    const other = new Client(this.baseUrl)
    other.cookies = new Map(this.cookies)
    return other
  }
}

export const DEMO = {
  instructor: 'instructor@larkspur.example',
  ta1: 'ta1@larkspur.example',
  ta2: 'ta2@larkspur.example',
  coordinator: 'coordinator@larkspur.example',
  student: (n: number) => `student${String(n).padStart(2, '0')}@larkspur.example`,
}

export async function signedIn(email: string, password?: string) {
  const client = new Client()
  await client.login(email, password)
  return client
}
