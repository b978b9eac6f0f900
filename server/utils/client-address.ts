import type { H3Event } from 'h3'

/** X-Forwarded-For is honoured only behind a proxy we were told to trust. */
export function clientAddress(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: Boolean(useRuntimeConfig().trustProxy) }) ?? 'unknown'
}
