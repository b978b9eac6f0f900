import { getRequestHeader, send, setResponseHeader, setResponseHeaders, setResponseStatus, type H3Event } from 'h3'
import type { NitroErrorHandler } from 'nitropack'
import { isBadRequestValue, isDatabaseUnavailable, isPasswordQueueFull, isUnstorableText, statisticsFailureOf } from './utils/errors'
import { errorMessageText, statusLineText } from './utils/status-line'

// Runs before Nuxt's own error handler: "PostgreSQL is unreachable" becomes a plain 503, a
// statistics engine refusing its numbers a 422 with its reason (never a 500), and a value
// PostgreSQL cannot hold (an id past 2^31, 31 February, a NUL in a text) a 400, a full
// password-hashing queue (a flood of sign-ins) a 503 to retry shortly; Nuxt renders them.
// Then every error's words are made safe to send (see `shortenErrorText`).
const handler: NitroErrorHandler = (error, event, { defaultHandler }) => {
  // A busy engine pool (server/utils/engines.ts) says when to try again.
  const retryAfter = (error.data as { retryAfterSeconds?: unknown } | undefined)?.retryAfterSeconds
  if (typeof retryAfter === 'number') setResponseHeader(event, 'retry-after', retryAfter)
  const statistics = statisticsFailureOf(error)
  if (isDatabaseUnavailable(error)) {
    error.statusCode = 503
    error.statusMessage = 'The database is unavailable; try again shortly'
    error.message = error.statusMessage
    error.unhandled = false
  } else if (statistics) {
    error.statusCode = 422
    error.statusMessage = 'The class statistics cannot be computed from these results'
    error.message = error.statusMessage
    error.data = { reason: statistics.message }
    error.unhandled = false
  } else if (isPasswordQueueFull(error)) {
    error.statusCode = 503
    error.statusMessage = 'Too many sign-ins at once; try again in a moment'
    error.message = error.statusMessage
    error.unhandled = false
    setResponseHeader(event, 'Retry-After', 2)
  } else if (isBadRequestValue(error)) {
    error.statusCode = 400
    error.statusMessage = 'A number or date in the request is out of range'
    error.message = error.statusMessage
    error.unhandled = false
  } else if (isUnstorableText(error)) {
    error.statusCode = 400
    error.statusMessage = 'A text in the request holds a control character that cannot be stored'
    error.message = error.statusMessage
    error.unhandled = false
  }
  return shortenErrorText(error, event, defaultHandler)
}

type DefaultHandler = Parameters<NitroErrorHandler>[2]['defaultHandler']

/**
 * The status line gets a short ASCII copy of the sentence (at most 200 characters: h3 would only
 * drop non-ASCII characters, and a long quoted cell made a 1.9 MB line that clients refuse). The
 * JSON body keeps the sentence itself, capped at 500 characters. Pages (HTML) are left to Nuxt,
 * which renders them with the short line.
 */
async function shortenErrorText(error: Parameters<NitroErrorHandler>[0], event: H3Event, defaultHandler: DefaultHandler) {
  // An unhandled error's own message may be a query or a driver's words: it never reaches a line.
  const sentence = errorMessageText(error.statusMessage || (error.unhandled ? '' : error.message) || '')
  error.statusMessage = statusLineText(sentence) || undefined
  if (!error.unhandled) error.message = errorMessageText(error.message || sentence)
  if (event.handled || !wantsJson(event)) return
  const answer = await defaultHandler(error, event, { json: true })
  setResponseHeaders(event, answer.headers)
  setResponseStatus(event, answer.status, answer.statusText)
  const body = typeof answer.body === 'object' && sentence && !(error.unhandled || error.fatal)
    ? { ...answer.body, statusMessage: sentence }
    : answer.body
  return send(event, JSON.stringify(body, null, 2))
}

// The same test Nuxt's error handler makes before it renders an error page instead of JSON.
function wantsJson(event: H3Event): boolean {
  const header = (name: string, part: string) => (getRequestHeader(event, name) ?? '').toLowerCase().includes(part)
  if (header('accept', 'text/html')) return false
  return header('accept', 'application/json') || header('user-agent', 'curl/') || header('user-agent', 'httpie/')
    || header('sec-fetch-mode', 'cors') || event.path.startsWith('/api/') || event.path.endsWith('.json')
}

export default handler
