import type { NitroErrorHandler } from 'nitropack'
import { setResponseHeader } from 'h3'
import { isBadRequestValue, isDatabaseUnavailable, isPasswordQueueFull, statisticsFailureOf } from './utils/errors'

// Runs before Nuxt's own error handler: "PostgreSQL is unreachable" becomes a plain 503, a
// statistics engine refusing its numbers a 422 with its reason (never a 500), and a value
// PostgreSQL cannot hold (an id past 2^31, 31 February) a 400, a full password-hashing queue
// (a flood of sign-ins) a 503 to retry shortly; Nuxt renders them. Everything else passes
// through untouched.
const handler: NitroErrorHandler = (error, event) => {
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
  }
}

export default handler
