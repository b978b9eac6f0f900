// Calendar arithmetic for server and browser, in one place, on date-fns and @date-fns/tz.
//
// A date is a calendar day written 'YYYY-MM-DD' (what PostgreSQL's DATE columns hold), not an
// instant: every step below is done at midnight UTC, so neither the machine's zone nor a
// daylight-saving change can move a day. Instants cross into dates only through a named zone
// (`isoDateOf`), and wall-clock times become instants only through one (`zonedInstant`).
// Formatting dates for people is not done here.
import {
  addDays as addDaysTo, addMonths as addMonthsTo, format, getISODay, getISOWeek, getISOWeekYear,
  isValid, parseISO, startOfISOWeek,
} from 'date-fns'
import { TZDate, tz } from '@date-fns/tz'

const IN_UTC = { in: tz('UTC') }
const DATE_FORMAT = 'yyyy-MM-dd'

const DATE_SHAPE = /^\d{4}-\d{2}-\d{2}$/

const textOf = (day: Date) => format(day, DATE_FORMAT, IN_UTC)

/**
 * Answers of the pure date functions below, per argument: date-fns in a zone takes tens of
 * microseconds a call, and a forecast or a term's schedule asks about the same few hundred days
 * thousands of times.
 */
function remembered<T>(compute: (value: string) => T): (value: string) => T {
  const known = new Map<string, T>()
  return (value) => {
    let answer = known.get(value)
    if (answer === undefined) {
      answer = compute(value)
      if (known.size >= 4096) known.delete(known.keys().next().value!)
      known.set(value, answer)
    }
    return answer
  }
}

const calendarDate = remembered((value) => {
  const day = parseISO(value, IN_UTC)
  return DATE_SHAPE.test(value) && isValid(day) && textOf(day) === value
})

/** Whether a 'YYYY-MM-DD' text names a day that exists (no 31 February). */
export function isCalendarDate(value: string): boolean {
  return typeof value === 'string' && calendarDate(value)
}

function dayOf(date: string): Date {
  if (!isCalendarDate(date)) throw new RangeError(`Not a date (YYYY-MM-DD): ${date}`)
  return parseISO(date, IN_UTC)
}

/** The calendar day an instant falls on in a zone (UTC unless named). */
export function isoDateOf(instant: Date | number | string, timezone = 'UTC'): string {
  const at = new Date(instant)
  // In UTC the ISO text already starts with the day (years 0-9999), without a zoned date-fns call.
  if (timezone === 'UTC' && at.getUTCFullYear() >= 0 && at.getUTCFullYear() <= 9999) return at.toISOString().slice(0, 10)
  return format(at, DATE_FORMAT, { in: tz(timezone) })
}

/** Today in a zone (UTC unless named). */
export function todayIn(timezone = 'UTC', now: Date = new Date()): string {
  return isoDateOf(now, timezone)
}

const movedDays = remembered((key) => {
  const at = key.lastIndexOf('|')
  return textOf(addDaysTo(dayOf(key.slice(0, at)), Number(key.slice(at + 1)), IN_UTC))
})

/** A date moved by whole days (negative: earlier). */
export function addDays(date: string, days: number): string {
  return movedDays(`${date}|${days}`)
}

/** A date moved by whole months; a day the target month lacks becomes its last (31 Jan + 1 = 28/29 Feb). */
export function addMonths(date: string, months: number): string {
  return textOf(addMonthsTo(dayOf(date), months, IN_UTC))
}

const DAY_MS = 86_400_000

/** Days since 1970-01-01 of a checked calendar date: midnight UTC has no daylight saving to skip. */
function epochDay(date: string): number {
  if (!isCalendarDate(date)) throw new RangeError(`Not a date (YYYY-MM-DD): ${date}`)
  // setUTCFullYear, not Date.UTC, which reads years 0-99 as 1900-1999.
  return new Date(0).setUTCFullYear(Number(date.slice(0, 4)), Number(date.slice(5, 7)) - 1, Number(date.slice(8, 10))) / DAY_MS
}

/**
 * Whole days from one date to another (negative when `to` is earlier). Plain arithmetic on UTC
 * midnights, the same answer as date-fns' differenceInCalendarDays in UTC: that one built four
 * zoned dates a call, a tenth of the forecast route's time when it checked its range.
 */
export function daysBetween(from: string, to: string): number {
  return epochDay(to) - epochDay(from)
}

/** ISO weekday: 1 = Monday … 7 = Sunday. */
export function isoWeekday(date: string): number {
  return getISODay(dayOf(date), IN_UTC)
}

/** Monday of the ISO week holding the date. */
export const weekStart: (date: string) => string = remembered((date) => textOf(startOfISOWeek(dayOf(date), IN_UTC)))

/** ISO 8601 week label: the week belongs to the year of its Thursday ('2026-W53', '2027-W01'). */
export const isoWeekLabel: (date: string) => string = remembered((date) => {
  const day = dayOf(date)
  return `${getISOWeekYear(day, IN_UTC)}-W${String(getISOWeek(day, IN_UTC)).padStart(2, '0')}`
})

function parseTime(value: string): [number, number] {
  const m = /^(\d{2}):(\d{2})(?::\d{2})?$/.exec(value)
  if (!m || Number(m[1]) > 23 || Number(m[2]) > 59) throw new RangeError(`Not a time (HH:MM): ${value}`)
  return [Number(m[1]), Number(m[2])]
}

/** The UTC instant of a wall-clock date and time ('HH:MM' or 'HH:MM:SS') in an IANA zone. */
export function zonedInstant(date: string, time: string, timezone: string): Date {
  if (!isCalendarDate(date)) throw new RangeError(`Not a date (YYYY-MM-DD): ${date}`)
  const [year, month, day] = date.split('-').map(Number) as [number, number, number]
  const [hh, mm] = parseTime(time)
  return new Date(new TZDate(year, month - 1, day, hh, mm, 0, timezone).getTime())
}
