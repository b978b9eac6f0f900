import { expect } from 'vitest'
import { Client, type Reply } from './http'

// Campus sign-in without a browser: a Client follows the redirects between Halocline and the
// identity provider by hand (cookies are kept per host like a browser's: both run on 127.0.0.1).

/** Follows 3xx answers from `url`; stops before fetching a URL whose path starts with `stopAt`. */
async function follow(client: Client, url: string, stopAt?: string): Promise<{ reply?: Reply<unknown>, url: string }> {
  let current = url
  for (let hops = 0; hops < 12; hops++) {
    if (stopAt && new URL(current).pathname.startsWith(stopAt)) return { url: current }
    const reply = await client.get(current) as Reply<unknown>
    const location = reply.headers.get('location')
    if (reply.status < 300 || reply.status >= 400 || !location) return { reply, url: current }
    current = new URL(location, current).href
  }
  throw new Error(`too many redirects from ${url}`)
}

/**
 * Starts a campus sign-in at Halocline, signs in at the local provider as `login` (unless the
 * client is still signed in there) and stops at the provider's redirect back: returns the callback URL (code and state) without calling it.
 */
export async function campusCallbackUrl(client: Client, login: string, { password = 'halocline-demo', next = '/' } = {}) {
  const start = await client.get(`/auth/campus/start?next=${encodeURIComponent(next)}`)
  expect(start.status).toBe(302)
  const { reply: form, url: formUrl } = await follow(client, start.headers.get('location')!, '/auth/campus/callback')
  // Still signed in at the provider (an earlier sign-in in this client): it sends us straight back.
  if (!form) return formUrl
  expect(form.status).toBe(200)
  const action = /action="([^"]+)"/.exec(form.text)?.[1]
  expect(action).toBeTruthy()
  const posted = await client.request(new URL(action!, formUrl).href, {
    method: 'POST', body: new URLSearchParams({ login, password }),
  })
  expect(posted.status, posted.text.slice(0, 300)).toBe(303)
  const { url } = await follow(client, new URL(posted.headers.get('location')!, formUrl).href, '/auth/campus/callback')
  expect(new URL(url).pathname).toBe('/auth/campus/callback')
  return url
}

/** Halocline's answer to a callback URL: where it sends the browser next. */
export async function callBack(client: Client, url: string) {
  const reply = await client.get(url)
  expect(reply.status).toBe(302)
  return reply.headers.get('location')!
}

/** The whole campus sign-in as `login`; returns where Halocline sent the browser at the end. */
export async function campusSignIn(login: string, options: { password?: string, next?: string, client?: Client } = {}) {
  const client = options.client ?? new Client()
  const landed = await callBack(client, await campusCallbackUrl(client, login, options))
  return { client, landed }
}
