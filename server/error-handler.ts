import type { NitroErrorHandler } from 'nitropack'
import { isBadRequestValue, isDatabaseUnavailable } from './utils/errors'

// Runs before Nuxt's own error handler: turn "PostgreSQL is unreachable" into a plain 503 and a
// value PostgreSQL cannot hold (an id past 2^31, 31 February) into a 400, and let Nuxt render
// it. Everything else passes through untouched.
const handler: NitroErrorHandler = (error) => {
  if (isDatabaseUnavailable(error)) {
    error.statusCode = 503
    error.statusMessage = 'The database is unavailable; try again shortly'
    error.message = error.statusMessage
    error.unhandled = false
  } else if (isBadRequestValue(error)) {
    error.statusCode = 400
    error.statusMessage = 'A number or date in the request is out of range'
    error.message = error.statusMessage
    error.unhandled = false
  }
}

export default handler
