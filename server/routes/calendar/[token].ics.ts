import type { H3Event } from 'h3'
import { calendarFeed, calendarOwner } from '~~/server/services/sections'

// A calendar program fetches this without a session: the token in the path is the credential.
// The router hands over the whole last segment ("<token>.ics") whatever it names the parameter.
// Refusals are short plain text with their own status, never an error page: a calendar program
// cannot follow a redirect to the sign-in page, and 410 tells it to stop asking. HEAD is answered
// here too (some programs check the address with it); a route for GET alone would leave HEAD to
// the page renderer, which redirects.
const TOKEN = /^([\w-]{43})\.ics$/

function plainAnswer(event: H3Event, status: number, reason: string, text: string) {
  setResponseStatus(event, status, reason)
  setResponseHeaders(event, { 'content-type': 'text/plain; charset=utf-8', 'cache-control': 'no-store' })
  return `${text}\n`
}

export default defineEventHandler(async (event) => {
  if (event.method !== 'GET' && event.method !== 'HEAD') {
    setResponseHeader(event, 'allow', 'GET, HEAD')
    return plainAnswer(event, 405, 'Method Not Allowed', 'A calendar feed is only read.')
  }
  const segment = getRequestURL(event).pathname.split('/').at(-1) ?? ''
  const token = TOKEN.exec(segment)?.[1]
  const found = token ? await calendarOwner(useDb(), token) : undefined
  if (found?.revoked) return plainAnswer(event, 410, 'Gone',
    'This calendar address was replaced. Copy the new one from your Halocline account page.')
  if (!found?.owner || found.owner.disabledAt) return plainAnswer(event, 404, 'Not Found', 'No calendar at this address.')
  const body = await calendarFeed(useDb(), found.owner, useRuntimeConfig(event).public.appUrl)
  setResponseHeaders(event, {
    'content-type': 'text/calendar; charset=utf-8',
    'cache-control': 'private, max-age=300',
    'content-disposition': 'inline; filename="halocline.ics"',
  })
  return body
})
