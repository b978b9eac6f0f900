import type { NitroErrorHandler } from 'nitropack'
import { setResponseHeader } from 'h3'
import { isBadRequestValue, isDatabaseUnavailable, statisticsFailureOf } from './utils/errors'

// Runs before Nuxt's own error handler: "PostgreSQL is unreachable" becomes a plain 503, a
// statistics engine refusing its numbers a 422 with its reason (never a 500), and a value
// PostgreSQL cannot hold (an id past 2^31, 31 February) a 400; Nuxt renders them. Everything
// else passes through untouched.
const handler: NitroErrorHandler = (error, event) => {
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
  } else if (isBadRequestValue(error)) {
    error.statusCode = 400
    error.statusMessage = 'A number or date in the request is out of range'
    error.message = error.statusMessage
    error.unhandled = false
  }
}

export default handler
