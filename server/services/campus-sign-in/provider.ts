import * as client from 'openid-client'
import type { CampusRefusal } from '#shared/types/campus'
import type { CampusSettings } from '../../utils/sign-in-settings'

// The provider's discovered metadata, per process, for a few minutes: a sign-in costs one
// round trip to the provider less, and a provider that was down is asked again soon.
const CACHE_MS = 5 * 60_000
let cached: { key: string, at: number, config: client.Configuration } | null = null

const isLoopback = (url: URL) => ['127.0.0.1', 'localhost', '[::1]'].includes(url.hostname)

/** The openid-client configuration for the campus provider (discovery from the issuer URL). */
export async function providerConfig(settings: CampusSettings): Promise<client.Configuration> {
  const key = `${settings.issuer.href}|${settings.clientId}`
  if (cached && cached.key === key && Date.now() - cached.at < CACHE_MS) return cached.config
  const auth = settings.clientSecret ? client.ClientSecretBasic(settings.clientSecret) : client.None()
  // Plain http only for a provider on this machine (the local stand-in); a real one must be https.
  const execute = settings.issuer.protocol === 'http:' && isLoopback(settings.issuer) ? [client.allowInsecureRequests] : []
  const metadata = { [client.clockTolerance]: settings.clockLeewaySeconds }
  const config = await client.discovery(settings.issuer, settings.clientId, metadata, auth, {
    execute, timeout: settings.timeoutSeconds,
  })
  config.timeout = settings.timeoutSeconds
  cached = { key, at: Date.now(), config }
  return config
}

/** Forget the cached metadata (the provider's keys may have changed after a failed check). */
export function forgetProviderConfig() {
  cached = null
}

const claimOf = (error: unknown): string | undefined => {
  const cause = (error as { cause?: { cause?: { claim?: unknown } } }).cause?.cause
  return typeof cause?.claim === 'string' ? cause.claim : undefined
}

/** Which refusal a failure of discovery or of the code exchange is, for the page and the audit row. */
export function refusalFor(error: unknown): CampusRefusal {
  if (error instanceof client.ResponseBodyError) {
    return error.error === 'invalid_grant' ? 'code-rejected' : error.status >= 500 ? 'provider-unavailable' : 'bad-token'
  }
  if (error instanceof client.AuthorizationResponseError) return 'provider-said-no'
  // fetch's own failures (refused connection, reset, DNS) come through as TypeError.
  if (error instanceof TypeError) return 'provider-unavailable'
  if (!(error instanceof client.ClientError)) return 'bad-token'
  switch (error.code) {
    case 'OAUTH_TIMEOUT':
    case 'OAUTH_ABORT':
    case 'OAUTH_RESPONSE_IS_NOT_CONFORM':
    case 'OAUTH_RESPONSE_IS_NOT_JSON':
      return 'provider-unavailable'
    case 'OAUTH_JWT_TIMESTAMP_CHECK_FAILED':
      return 'clock-skew'
    case 'OAUTH_JWT_CLAIM_COMPARISON_FAILED': {
      const claim = claimOf(error)
      if (claim === 'aud' || claim === 'azp') return 'wrong-audience'
      if (claim === 'iss') return 'wrong-issuer'
      if (claim === 'nonce') return 'wrong-nonce'
      return 'bad-token'
    }
    case 'OAUTH_JSON_ATTRIBUTE_COMPARISON_FAILED':
      return 'wrong-issuer'
    case 'OAUTH_INVALID_RESPONSE':
      return /"iss"/.test(String((error.cause as Error | undefined)?.message ?? error.message)) ? 'wrong-issuer' : 'bad-token'
    default:
      return 'bad-token'
  }
}
