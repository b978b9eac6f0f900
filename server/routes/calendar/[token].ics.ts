// A calendar program fetches this without a session: the token in the path is the credential.
// The router hands over the whole last segment ("<token>.ics") whatever it names the parameter.
const TOKEN = /^([\w-]{43})\.ics$/

export default defineEventHandler(async (event) => {
  const segment = getRequestURL(event).pathname.split('/').at(-1) ?? ''
  const token = TOKEN.exec(segment)?.[1]
  const owner = token ? await calendarOwner(token) : undefined
  if (!owner || owner.disabledAt) throw createError({ statusCode: 404, statusMessage: 'Calendar not found' })
  const body = await calendarFeed(owner)
  setResponseHeaders(event, {
    'content-type': 'text/calendar; charset=utf-8',
    'cache-control': 'private, max-age=300',
    'content-disposition': 'inline; filename="halocline.ics"',
  })
  return body
})
