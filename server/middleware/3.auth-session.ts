// nuxt-auth-utils serves /api/_auth/session itself: its GET mints a session cookie even for an
// anonymous caller, and its DELETE drops the cookie without ending the session (a copy of the
// sealed cookie stays valid). This answers first, so the module's handlers never run: GET gives
// the session 2.session.ts has already checked (useUserSession().fetch() reads it) and sets no
// cookie; any other method is 405, because signing out is POST /api/auth/logout, which revokes.
const SESSION_PATH = '/api/_auth/session'

// Every request passes here: only a path that names the session path, or escapes a
// character, needs the full comparison below.
const MAY_NAME_SESSION = /_auth|%/i

export default defineEventHandler((event) => {
  if (!MAY_NAME_SESSION.test(event.path)) return
  // The router would also match a trailing slash, other letter case or an escaped character.
  const path = safeDecode(event.path.split('?')[0]!).replace(/\/+$/, '').toLowerCase()
  if (path !== SESSION_PATH) return
  setResponseHeader(event, 'cache-control', 'no-store')
  if (event.method === 'GET' || event.method === 'HEAD') {
    const user = event.context.auth?.user
    return user ? { user } : {}
  }
  setResponseHeader(event, 'allow', 'GET, HEAD')
  throw createError({ statusCode: 405, statusMessage: 'Sign out with POST /api/auth/logout' })
})

function safeDecode(path: string): string {
  try {
    return decodeURI(path)
  } catch {
    return path
  }
}
