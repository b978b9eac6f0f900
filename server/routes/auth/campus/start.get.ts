import { safeNextPath } from '#shared/utils/safe-next'
import { startCampusSignIn } from '../../../services/campus-sign-in'
import { refuseCampusSignIn, setCampusBrowserCookie } from '../../../utils/campus-cookies'

// GET /auth/campus/start?next=/path: to the campus provider's sign-in, or to a page that says
// why not (provider down or slow). Not an API route: the browser navigates here.
export default defineEventHandler(async (event) => {
  const settings = campusSettings()
  if (!settings) throw createError({ statusCode: 404, statusMessage: 'Campus sign-in is not set up here' })
  const nextPath = safeNextPath(getQuery(event).next)
  try {
    const { url, browserToken } = await startCampusSignIn(useDb(), settings, nextPath)
    setCampusBrowserCookie(event, settings, browserToken)
    return sendRedirect(event, url, 302)
  } catch (error) {
    console.error(`[campus sign-in] could not start: ${error instanceof Error ? error.message : String(error)}`)
    await audit(useDb(), event, {
      action: 'sign-in.campus-refused', entity: 'user', after: { reason: 'provider-unavailable', detail: 'start' },
    })
    return refuseCampusSignIn(event, 'provider-unavailable')
  }
})
