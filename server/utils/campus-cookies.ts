import type { H3Event } from 'h3'
import type { CampusRefusal } from '#shared/types/campus'
import type { CampusSettings } from './sign-in-settings'

// The random value that ties a campus sign-in to the browser that started it. Lax, so it rides
// along on the provider's top-level redirect back to us; scoped to the callback's path.
const BROWSER_COOKIE = 'halocline-campus'
const COOKIE_PATH = '/auth/campus'

export function setCampusBrowserCookie(event: H3Event, settings: CampusSettings, token: string) {
  setCookie(event, BROWSER_COOKIE, token, {
    httpOnly: true, sameSite: 'lax', path: COOKIE_PATH, maxAge: 15 * 60, secure: settings.appUrl.startsWith('https:'),
  })
}

export function readCampusBrowserCookie(event: H3Event): string | undefined {
  return getCookie(event, BROWSER_COOKIE) || undefined
}

export function clearCampusBrowserCookie(event: H3Event, settings: CampusSettings) {
  deleteCookie(event, BROWSER_COOKIE, { path: COOKIE_PATH, secure: settings.appUrl.startsWith('https:') })
}

/** The page that tells a person why the campus sign-in did not work (pages/sign-in-problem.vue). */
export function refuseCampusSignIn(event: H3Event, reason: CampusRefusal) {
  return sendRedirect(event, `/sign-in-problem?reason=${reason}`, 302)
}
