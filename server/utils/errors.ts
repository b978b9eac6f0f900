import { createError } from 'h3'
import { ChemistryInputError } from '../../shared/utils/lib/molecule'

// Errors that mean "PostgreSQL is not reachable right now" rather than "this query is wrong".
// The shapes a restart produces (each seen from pg 8 against a stopped, restarting or
// immediately shut down cluster): a server notice with a SQLSTATE, a socket errno, or one of
// pg's and pg-pool's own messages without a code.
const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EHOSTUNREACH', 'ECONNABORTED', 'EAI_AGAIN',
  '57P01', // admin_shutdown: "terminating connection due to administrator command"
  '57P02', // crash_shutdown
  '57P03', // cannot_connect_now: "the database system is starting up / shutting down"
  '53300', // too_many_connections, while clients reconnect after a restart
  '08000', '08001', '08003', '08004', '08006',
])
const UNAVAILABLE_MESSAGES = [
  'Connection terminated', // "… unexpectedly", "… due to connection timeout"
  'connection timeout',
  'timeout exceeded when trying to connect', // pg-pool waiting for a free or new client
  'timeout expired', // pg's connectionTimeoutMillis: the server took the socket but never answered
  'Client has encountered a connection error', // a checked-out client that lost its socket
  'Client was closed and is not queryable',
  'terminating connection',
]

export function isDatabaseUnavailable(error: unknown, depth = 0): boolean {
  if (!error || typeof error !== 'object' || depth > 5) return false
  const e = error as { code?: unknown, message?: unknown, cause?: unknown, errors?: unknown }
  if (typeof e.code === 'string' && UNAVAILABLE_CODES.has(e.code)) return true
  if (typeof e.message === 'string' && UNAVAILABLE_MESSAGES.some((m) => (e.message as string).includes(m))) return true
  // Node reports a refused dual-stack connect as an AggregateError.
  if (Array.isArray(e.errors) && e.errors.some((inner) => isDatabaseUnavailable(inner, depth + 1))) return true
  return isDatabaseUnavailable(e.cause, depth + 1)
}

// PostgreSQL refusing a value the request carried: a number beyond its integer column (an id of
// 2^31 or more) or an impossible date. The request is wrong, not the server.
const BAD_VALUE_CODES = new Set([
  '22003', // numeric_value_out_of_range
  '22008', // datetime_field_overflow
  '22007', // invalid_datetime_format
])

/** A statistics engine refusing its input (shared/utils/statistics.ts): never a 500. */
export function statisticsFailureOf(error: unknown, depth = 0): Error | null {
  if (!error || typeof error !== 'object' || depth > 5) return null
  const e = error as { name?: unknown, cause?: unknown }
  if (e.name === 'StatisticsError' && error instanceof Error) return error
  return statisticsFailureOf(e.cause, depth + 1)
}

export function isBadRequestValue(error: unknown, depth = 0): boolean {
  return hasPostgresCode(error, BAD_VALUE_CODES, depth)
}

// Text PostgreSQL cannot store: NUL (22021) or, in a jsonb value, "\u0000" (22P05). The body
// readers refuse both first, naming the field; this is the second line for any path they miss.
const UNSTORABLE_TEXT_CODES = new Set([
  '22021', // character_not_in_repertoire
  '22P05', // untranslatable_character
])

export function isUnstorableText(error: unknown): boolean {
  return hasPostgresCode(error, UNSTORABLE_TEXT_CODES)
}

function hasPostgresCode(error: unknown, codes: Set<string>, depth = 0): boolean {
  if (!error || typeof error !== 'object' || depth > 5) return false
  const e = error as { code?: unknown, cause?: unknown }
  if (typeof e.code === 'string' && codes.has(e.code)) return true
  return hasPostgresCode(e.cause, codes, depth + 1)
}

/** server/utils/password.ts refusing more work than its queue holds. */
export function isPasswordQueueFull(error: unknown, depth = 0): boolean {
  if (!error || typeof error !== 'object' || depth > 5) return false
  const e = error as { name?: unknown, cause?: unknown }
  return e.name === 'PasswordQueueFullError' || isPasswordQueueFull(e.cause, depth + 1)
}

function rethrowAsBadRequest(error: unknown): never {
  if (error instanceof ChemistryInputError) {
    throw createError({ statusCode: 400, statusMessage: error.message, data: { code: error.code } })
  }
  throw error
}

/** Engine input errors are the caller's mistake: 400 with the engine's own sentence. Works for a promise too. */
export function asBadRequest<T>(work: () => T): T {
  try {
    const result = work()
    return (result instanceof Promise ? result.catch(rethrowAsBadRequest) : result) as T
  } catch (error) {
    rethrowAsBadRequest(error)
  }
}
