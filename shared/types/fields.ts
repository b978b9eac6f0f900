import { z } from 'zod'
import { isoDateOf } from '../utils/dates'
import { calendarDateProblem, EARLIEST_DATE, LATEST_DATE } from './lib/date-range'
import { textInputProblem } from '../utils/text-input'
import { casNumberProblem, normalCasNumber } from '../utils/cas'

// The pieces every schema is built from, so each text has a length and a character rule, each
// date a plausible range, each id a PostgreSQL integer and each list a size. Every helper gives
// one message per problem, without the field name: the server puts "field: " in front.

// The date range and its sentence live in a zod-free file the forms can load on their own.
export { calendarDateProblem, EARLIEST_DATE, LATEST_DATE }
/** A section's meetings span at most this many days (a long academic year). */
export const MAX_TERM_DAYS = 366
/** PostgreSQL's integer: ids beyond it name nothing. */
export const MAX_RECORD_ID = 2_147_483_647

/** One line of text (a name, a code, a room): trimmed, at most `max` characters, no breaks. */
export function lineText(max: number, required?: string) {
  const base = z.string().trim()
  return (required ? base.min(1, required) : base).max(max, `Use at most ${max} characters`)
    .superRefine((value, ctx) => {
      const problem = textInputProblem(value, { singleLine: true })
      if (problem) ctx.addIssue({ code: 'custom', message: problem })
    })
}

/** Text that may run over several lines (notes, comments, reasons, an address). */
export function blockText(max: number, required?: string) {
  const base = z.string().trim()
  return (required ? base.min(1, required) : base).max(max, `Use at most ${max} characters`)
    .superRefine((value, ctx) => {
      const problem = textInputProblem(value)
      if (problem) ctx.addIssue({ code: 'custom', message: problem })
    })
}

/** A calendar date, 'YYYY-MM-DD', between EARLIEST_DATE and LATEST_DATE. */
export function dateField(format = 'Use YYYY-MM-DD') {
  return z.string({ error: format }).superRefine((value, ctx) => {
    const problem = calendarDateProblem(value)
    // continue: false keeps an object's own checks (end after start, term length) off a value that is not a date.
    if (problem) ctx.addIssue({ code: 'custom', message: problem === 'Use YYYY-MM-DD' ? format : problem, continue: false })
  })
}

/** An instant with its offset (ISO 8601), in the same range of years as the dates. */
export function instantField(format = 'Use an ISO 8601 date and time with its offset') {
  return z.string({ error: format }).superRefine((value, ctx) => {
    if (!z.iso.datetime({ offset: true }).safeParse(value).success) {
      return void ctx.addIssue({ code: 'custom', message: format, continue: false })
    }
    const day = isoDateOf(value)
    if (day < EARLIEST_DATE || day > LATEST_DATE) {
      ctx.addIssue({ code: 'custom', message: `Use a date from ${EARLIEST_DATE} to ${LATEST_DATE}`, continue: false })
    }
  })
}

/** The id of a stored row, in a JSON body. */
export function recordId(message = 'Pick an item from the list') {
  return z.number({ error: message }).int(message).min(1, message).max(MAX_RECORD_ID, message)
}

/** `:id` in a path or `?id=` in a query: digits only. */
export function recordIdParam(message = 'Not an id') {
  // Past PostgreSQL's integer range is still a well-formed number: say so rather than "not an id".
  return z.coerce.number({ error: message }).int(message).min(1, message)
    .max(MAX_RECORD_ID, `This id is out of range (the largest is ${MAX_RECORD_ID})`)
}

/** The `:id` of every route that names a stored row in its path. */
export const idParamsSchema = z.object({ id: recordIdParam() })

/** A list of ids: at least one, at most `max`, e.g. recordIdList(200, 'section', 'sections'). */
export function recordIdList(max: number, noun: string, plural = `${noun}s`) {
  return z.array(recordId(`Pick a ${noun} from the list`), { error: `Send a list of ${plural}` })
    .min(1, `Pick at least one ${noun}`)
    .max(max, `At most ${max} ${plural}`)
}

/**
 * An optional CAS Registry Number: '' and null mean none; spaces for hyphens are accepted. The
 * check digit is verified (shared/utils/cas.ts).
 */
export function casNumberField() {
  return z.string({ error: 'Enter the CAS number as text' }).trim().max(14, 'Use at most 14 characters').nullable()
    .transform((value) => (value ? normalCasNumber(value) : null))
    .superRefine((value, ctx) => {
      const problem = value === null ? null : casNumberProblem(value)
      if (problem) ctx.addIssue({ code: 'custom', message: problem })
    })
}
