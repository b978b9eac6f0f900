// What a browser or a proxy may keep. JSON answers depend on who asks and change with every
// write: never stored (`private, no-store`). Pages are rendered with the reader's data in them:
// a signed-in page is never stored either; the anonymous ones (sign-in, invitation) may be kept
// but are checked again each time. A route that knows better sets its own (downloads, calendar
// feeds). Hashed build files get a year and `immutable` from Nitro (its public-asset rule for
// /_nuxt/); other files in public/ are given a day in nuxt.config.ts.
export default defineEventHandler((event) => {
  const signedIn = Boolean(event.context.auth?.user)
  const value = event.path.startsWith('/api/') || signedIn ? 'private, no-store' : 'no-cache'
  setResponseHeader(event, 'cache-control', value)
})
