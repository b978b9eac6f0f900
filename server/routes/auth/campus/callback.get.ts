import { finishCampusSignIn } from '../../../services/campus-sign-in'
import { clearCampusBrowserCookie, readCampusBrowserCookie, refuseCampusSignIn } from '../../../utils/campus-cookies'

// GET /auth/campus/callback?code=…&state=…: where the campus provider sends the browser back.
// Signs in with our own sealed session, or sends the browser to a page that says why not.
export default defineEventHandler(async (event) => {
  const settings = campusSettings()
  if (!settings) throw createError({ statusCode: 404, statusMessage: 'Campus sign-in is not set up here' })
  const browserToken = readCampusBrowserCookie(event)
  clearCampusBrowserCookie(event, settings)
  const outcome = await finishCampusSignIn(useDb(), settings, {
    url: new URL(event.path, `${settings.appUrl}/`),
    browserToken,
    who: auditActorOf(event),
  })
  if ('refused' in outcome) {
    if (outcome.retryAfterSeconds) setResponseHeader(event, 'Retry-After', outcome.retryAfterSeconds)
    return refuseCampusSignIn(event, outcome.refused)
  }
  const user = outcome.signedIn
  await replaceUserSession(event, {
    user: { id: user.id, name: user.name, role: user.role },
    secure: { sv: user.sessionVersion },
    loggedInAt: Date.now(),
    via: 'campus',
  })
  return sendRedirect(event, outcome.nextPath, 302)
})
