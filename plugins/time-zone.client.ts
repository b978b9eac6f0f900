// After hydration, take the browser's own zone for dates shown outside a course, and remember it
// in a cookie for the server's next render (see composables/useTimeZone.ts).
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('app:suspense:resolve', () => {
    const own = Intl.DateTimeFormat().resolvedOptions().timeZone
    if (!isKnownTimeZone(own)) return
    const zone = useTimeZone()
    if (zone.value !== own) zone.value = own
    const cookie = useCookie<string | null>(TIME_ZONE_COOKIE, { maxAge: 60 * 60 * 24 * 365, sameSite: 'lax', path: '/' })
    if (cookie.value !== own) cookie.value = own
  })
})
