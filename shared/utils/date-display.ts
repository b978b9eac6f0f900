import { format, isValid } from 'date-fns'
import { TZDate } from '@date-fns/tz'

// Dates and times as people read them, in one style everywhere: "Thu 10 Dec 2026",
// "Thu 10 Dec 2026, 13:00" (English, 24-hour), "week of 30 Nov". Two kinds of value come in:
// calendar dates ('YYYY-MM-DD': a meeting day, an expiry date), which belong to no zone and are
// shown as written, and instants (ISO strings with an offset, Date objects), which are shown on
// the wall clock of the zone given: the course's, else the reader's own. Nothing here reads the
// process's zone or the clock, so the server, the browser and the tests all write the same text.

export type DateInput = string | Date | null | undefined

const CALENDAR_DATE = /^(\d{4})-(\d{2})-(\d{2})$/

export const DATE_FORMAT = 'EEE d MMM yyyy'
export const DATE_TIME_FORMAT = 'EEE d MMM yyyy, HH:mm'
/** Inside a table headed by its week, where the year is already said. */
export const DAY_FORMAT = 'EEE d MMM'
export const TIME_FORMAT = 'HH:mm'

/** What stands in for a missing date. */
export const NO_DATE = '—'

/** The moment to show, on the wall clock of `zone`; null for a missing or unreadable value. */
function inZone(value: DateInput, zone: string): TZDate | null {
  if (value === null || value === undefined || value === '') return null
  if (typeof value === 'string') {
    // A calendar date is the same day everywhere: read it at noon UTC and show it in UTC.
    const day = CALENDAR_DATE.exec(value)
    if (day) {
      const date = new TZDate(Date.UTC(Number(day[1]), Number(day[2]) - 1, Number(day[3]), 12), 'UTC')
      return isValid(date) && date.getDate() === Number(day[3]) ? date : null
    }
  }
  const date = new TZDate(typeof value === 'string' ? Date.parse(value) : value.getTime(), zone)
  return isValid(date) ? date : null
}

function shown(value: DateInput, zone: string, pattern: string): string {
  const date = inZone(value, zone)
  if (date) return format(date, pattern)
  return typeof value === 'string' && value ? value : NO_DATE
}

/** "Thu 10 Dec 2026": a calendar date as written, or the day an instant falls on in `zone`. */
export function displayDate(value: DateInput, zone = 'UTC'): string {
  return shown(value, zone, DATE_FORMAT)
}

/** "Thu 10 Dec 2026, 13:00" in `zone`. */
export function displayDateTime(value: DateInput, zone: string): string {
  return shown(value, zone, DATE_TIME_FORMAT)
}

/** "Thu 10 Dec", for rows under a heading that names the week. */
export function displayDay(value: DateInput, zone = 'UTC'): string {
  return shown(value, zone, DAY_FORMAT)
}

/** "13:00" in `zone`. */
export function displayTime(value: DateInput, zone: string): string {
  return shown(value, zone, TIME_FORMAT)
}

/** "Thu 10 Dec 2026, 13:00–16:00": a meeting's start and end on one day in `zone`. */
export function displayTimeSpan(start: DateInput, end: DateInput, zone: string): string {
  const from = inZone(start, zone)
  const to = inZone(end, zone)
  if (!from || !to) return displayDateTime(start, zone)
  const sameDay = format(from, 'yyyy-MM-dd') === format(to, 'yyyy-MM-dd')
  return `${format(from, DATE_TIME_FORMAT)}–${format(to, sameDay ? TIME_FORMAT : DATE_TIME_FORMAT)}`
}

/** "week of 30 Nov" for the week that starts on `value` ("Week of 30 Nov" with `{ capital: true }`). */
export function displayWeekOf(value: DateInput, options: { capital?: boolean } = {}): string {
  const text = `week of ${shown(value, 'UTC', 'd MMM')}`
  return options.capital ? `W${text.slice(1)}` : text
}

/**
 * "today", "tomorrow", "in 3 days", "yesterday", "2 days ago": how far the day of `value` is
 * from the day of `now`, both counted in `zone` (so a deadline at 23:59 in Chicago is "today"
 * in Chicago, wherever the reader sits).
 */
export function displayDaysFrom(value: DateInput, now: Date, zone: string): string {
  const date = inZone(value, zone)
  if (!date) return ''
  // Whole days between the two calendar dates, each read on its own wall clock.
  const days = Math.round((Date.parse(format(date, 'yyyy-MM-dd')) - Date.parse(calendarDateIn(now, zone))) / 86_400_000)
  if (days === 0) return 'today'
  if (days === 1) return 'tomorrow'
  if (days === -1) return 'yesterday'
  return days > 0 ? `in ${days} days` : `${-days} days ago`
}

/** Today's calendar date ('YYYY-MM-DD') in `zone`. */
export function calendarDateIn(now: Date, zone: string): string {
  return format(new TZDate(now.getTime(), zone), 'yyyy-MM-dd')
}

/** An instant as a `datetime-local` field's value ('YYYY-MM-DDTHH:mm') on the wall clock of `zone`; '' for none. */
export function wallClockInput(value: DateInput, zone: string): string {
  const date = inZone(value, zone)
  return date ? format(date, "yyyy-MM-dd'T'HH:mm") : ''
}
