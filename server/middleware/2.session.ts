import type { H3Event } from 'h3'

// Paths that never need to know who is asking: static assets, the health probe.
function skips(path: string): boolean {
  return path.startsWith('/_nuxt/') || path === '/api/health' || path.startsWith('/favicon')
}

async function loadSession(event: H3Event, name: string, sealed: string) {
  const key = cookieKey(sealed)
  const cached = getCachedSession(key)
  if (cached) {
    // h3 looks here before unsealing, so the cookie is unsealed once per minute, not per request.
    event.context.sessions ??= Object.create(null)
    event.context.sessions![name] = cached
    return { session: await getUserSession(event), key }
  }
  const session = await getUserSession(event)
  const raw = event.context.sessions?.[name]
  if (raw && session.user) cacheSession(key, { id: raw.id, createdAt: raw.createdAt, data: raw.data })
  return { session, key }
}

export default defineEventHandler(async (event) => {
  event.context.auth = null
  if (skips(event.path)) return
  // The process-wide config: reading it per event (useRuntimeConfig(event)) re-applies every
  // environment override on each request, which cost more than the rest of the request.
  const name = useRuntimeConfig().session.name as string
  const sealed = parseCookies(event)[name]
  // No cookie: do not call getUserSession, which would mint an empty session cookie.
  if (!sealed) return

  const { session, key } = await loadSession(event, name, sealed)
  const user = session.user
  if (!user) return

  const state = await getAccountState(user.id, () =>
    useDb()
      .selectFrom('users')
      .select(['sessionVersion', 'disabledAt'])
      .where('id', '=', user.id)
      .executeTakeFirst()
      .then((row) => row && { sessionVersion: row.sessionVersion, disabled: row.disabledAt !== null }), accountNoticesLive())

  if (!state || state.disabled || state.sessionVersion !== session.secure?.sv) {
    forgetSession(key)
    await clearUserSession(event)
    return
  }
  event.context.auth = { user: { id: user.id, name: user.name, role: user.role } }
})
