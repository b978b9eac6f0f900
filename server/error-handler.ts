import type { NitroErrorHandler } from 'nitropack'
import { isDatabaseUnavailable } from './utils/errors'

// Runs before Nuxt's own error handler: turn "PostgreSQL is unreachable" into a plain 503
// (page or JSON), and let Nuxt render it. Everything else passes through untouched.
const handler: NitroErrorHandler = (error) => {
  if (isDatabaseUnavailable(error)) {
    error.statusCode = 503
    error.statusMessage = 'The database is unavailable; try again shortly'
    error.message = error.statusMessage
    error.unhandled = false
  }
}

export default handler
