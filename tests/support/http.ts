import { expect, inject } from 'vitest'
import type { TypedInternalResponse } from 'nitropack/types'

type Method = 'get' | 'head' | 'post' | 'put' | 'patch' | 'delete'

/**
 * What a route answers to a method, typed from its handler's return (Nitro's InternalApi, the
 * same table `$fetch` in the app is typed from): `Answer<'/api/courses'>` is the course list.
 * A path no route declares gives `unknown`.
 */
export type Answer<Path extends string, M extends Method = 'get'> = TypedInternalResponse<Path, unknown, M>

/** The body of a refusal, as server/error-handler.ts writes it. */
export interface Refusal {
  statusCode: number
  statusMessage: string
  message: string
  data?: {
    field?: string
    issues?: Array<{ field: string, message: string }>
    rows?: Array<{ row: number, message: string }>
    conflicts?: Array<{ kind: string, message: string, sectionIds?: number[] }>
    reason?: string
    code?: string
    [key: string]: unknown
  }
}

export interface Reply<T> {
  status: number
  headers: Headers
  /** The answer as the route's handler returns it: check `status` first. */
  body: T
  /** The same answer read as a refusal (4xx, 5xx): its sentence and data. */
  refusal: Refusal
  /** The answer as text, for routes that send a file (iCalendar, CSV) rather than JSON. */
  text: string
}

/** A reply whose body is read as JSON by the caller: a route no handler types (`unknown`). */
export function replyOf<T>(status: number, headers: Headers, text: string, parsed: unknown): Reply<T> {
  return { status, headers, body: parsed as T, refusal: parsed as Refusal, text }
}

/** A tiny cookie-keeping client: one instance is one browser-like session. */
export class Client {
  cookies = new Map<string, string>()
  constructor(readonly baseUrl = inject('baseUrl')) {}

  get cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  /** Any method; the answer is typed by the route and the method given in `init`. */
  async request<Path extends string, M extends Uppercase<Method> = 'GET'>(path: Path, init: Omit<RequestInit, 'method'> & { method?: M, json?: unknown, duplex?: 'half' } = {}): Promise<Reply<Answer<Path, Lowercase<M>>>> {
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
    return replyOf(response.status, response.headers, text, parsed)
  }

  get<Path extends string>(path: Path, init: Omit<RequestInit, 'method'> = {}) {
    return this.request(path, { ...init, method: 'GET' })
  }

  post<Path extends string>(path: Path, json?: unknown, init: Omit<RequestInit, 'method'> = {}) {
    return this.request(path, { ...init, method: 'POST', json })
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

/** The body of a reply that must have this status (200 unless told); the body is shown when not. */
export async function expectOk<T>(reply: Promise<Reply<T>>, status = 200): Promise<T> {
  const r = await reply
  expect(r.status, JSON.stringify(r.body)).toBe(status)
  return r.body
}
