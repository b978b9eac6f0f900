import type { H3Event } from 'h3'

// Paths that never need to know who is asking: static assets, the health probe.
function skips(path: string): boolean {
  return path.startsWith('/_nuxt/') || path === '/api/health' || path.startsWith('/favicon')
}

type SessionData = Awaited<ReturnType<typeof getUserSession>>

async function loadSession(event: H3Event, name: string, sealed: string): Promise<SessionData> {
  const cached = getCachedSession(sealed)
  if (cached) {
    // h3 looks here before unsealing, so the cookie is unsealed once per minute, not per
    // request, and a later getUserSession or replaceUserSession in the route finds it. Its data
    // is what getUserSession would answer.
    event.context.sessions ??= Object.create(null)
    event.context.sessions![name] = cached
    return cached.data as SessionData
  }
  const session = await getUserSession(event)
  const raw = event.context.sessions?.[name]
  if (raw && session.user) cacheSession(sealed, { id: raw.id, createdAt: raw.createdAt, data: raw.data })
  return session
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

  const session = await loadSession(event, name, sealed)
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
    forgetSession(sealed)
    await clearUserSession(event)
    return
  }
  event.context.auth = { user: { id: user.id, name: user.name, role: user.role } }
})
