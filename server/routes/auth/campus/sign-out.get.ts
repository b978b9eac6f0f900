import { providerConfig } from '../../../services/campus-sign-in'
import { buildEndSessionUrl } from 'openid-client'

// GET /auth/campus/sign-out: after signing out of Halocline, to the campus provider's own
// sign-out (it asks the person to confirm), then back to our sign-in page.
export default defineEventHandler(async (event) => {
  const settings = campusSettings()
  if (!settings) return sendRedirect(event, '/login', 302)
  try {
    const config = await providerConfig(settings)
    if (!config.serverMetadata().end_session_endpoint) return sendRedirect(event, '/login?signedOut=1', 302)
    const url = buildEndSessionUrl(config, { client_id: settings.clientId, post_logout_redirect_uri: `${settings.appUrl}/login` })
    return sendRedirect(event, url.href, 302)
  } catch {
    return sendRedirect(event, '/sign-in-problem?reason=provider-unavailable', 302)
  }
})
