// Date checks without zod: the schemas (fields.ts, stockroom.ts) and the forecast's range form
// share them, so the form gives the route's messages without loading zod.
// Not auto-imported (a folder below shared/types): import it explicitly.
import { daysBetween, isCalendarDate } from '../../utils/dates'

/** Teaching dates: anything outside is a typing slip (1000-01-01, 9999-12-31), not a term. */
export const EARLIEST_DATE = '2000-01-01'
export const LATEST_DATE = '2100-12-31'

export const FORECAST_MAX_DAYS = 366

const DATE_SHAPE = /^\d{4}-\d{2}-\d{2}$/

/** What is wrong with a YYYY-MM-DD date, or null: one sentence, whichever check fails first. */
export function calendarDateProblem(value: string): string | null {
  if (!DATE_SHAPE.test(value)) return 'Use YYYY-MM-DD'
  if (!isCalendarDate(value)) return 'Not a calendar date'
  if (value < EARLIEST_DATE || value > LATEST_DATE) return `Use a date from ${EARLIEST_DATE} to ${LATEST_DATE}`
  return null
}

/** What is wrong with the end of a forecast range of two good dates, or null. */
export function forecastEndProblem(from: string, to: string): string | null {
  if (to < from) return 'Must be on or after from'
  if (daysBetween(from, to) > FORECAST_MAX_DAYS) return `At most ${FORECAST_MAX_DAYS} days after from`
  return null
}

/** The forecast range form's errors by field, as the route would place them; empty when it is good. */
export function forecastRangeErrors(range: { from: string, to: string }): { from?: string, to?: string } {
  const from = calendarDateProblem(range.from)
  const to = calendarDateProblem(range.to)
  if (from || to) return { ...(from && { from }), ...(to && { to }) }
  const end = forecastEndProblem(range.from, range.to)
  return end ? { to: end } : {}
}
