import type { H3Event } from 'h3'

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])

// CSRF defence in depth beside SameSite=Lax: a state-changing API call must come from our own
// origin. Clients that send neither header (curl, integrations) are not browsers and carry no
// ambient cookie by accident, so they pass.
function isCrossSite(event: H3Event): boolean {
  const fetchSite = getRequestHeader(event, 'sec-fetch-site')
  if (fetchSite && fetchSite !== 'same-origin' && fetchSite !== 'none') return true
  // Without Origin, an old browser may still say where the request came from in Referer.
  const origin = getRequestHeader(event, 'origin') ?? getRequestHeader(event, 'referer')
  if (!origin) return false
  if (origin === 'null') return true
  try {
    return new URL(origin).host !== getRequestHost(event, { xForwardedHost: useRuntimeConfig().trustProxy })
  } catch {
    return true
  }
}

export default defineEventHandler((event) => {
  setResponseHeaders(event, {
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'same-origin',
    'X-Frame-Options': 'DENY',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Permissions-Policy': 'camera=(), microphone=(), geolocation=(), payment=()',
  })
  if (event.path.startsWith('/api/') && !SAFE_METHODS.has(event.method) && isCrossSite(event)) {
    throw createError({ statusCode: 403, statusMessage: 'Requests must come from the Halocline site itself' })
  }
})
