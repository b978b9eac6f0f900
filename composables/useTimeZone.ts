/** The cookie that tells the server the reader's own zone, so its render matches the browser's. */
export const TIME_ZONE_COOKIE = 'halocline-tz'

/** Whether `zone` is an IANA zone this runtime knows. */
export function isKnownTimeZone(zone: unknown): zone is string {
  if (typeof zone !== 'string' || !zone || zone.length > 64) return false
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone })
    return true
  } catch {
    return false
  }
}

/**
 * The reader's own time zone, for dates with no course around them (the outbox, the library,
 * order sheets). The server renders with the zone the browser last reported in a cookie, UTC
 * before the first report; plugins/time-zone.client.ts corrects it after hydration, so the
 * first render and the browser's agree and nothing mismatches.
 */
export function useTimeZone() {
  return useState<string>('halocline-time-zone', () => {
    const reported = useCookie<string | null>(TIME_ZONE_COOKIE).value
    return isKnownTimeZone(reported) ? reported : 'UTC'
  })
}
