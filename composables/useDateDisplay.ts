import type { MaybeRefOrGetter } from 'vue'
import {
  calendarDateIn, displayDate, displayDateTime, displayDay, displayDaysFrom, displayTime, displayTimeSpan, type DateInput,
} from '#shared/utils/date-display'

/**
 * Dates for a component, in the course's zone when there is a course, else the reader's own:
 *
 *   const dates = useDateDisplay()            // the zone the page provided (provideCourseZone)
 *   const dates = useDateDisplay(() => row.timezone)   // or a zone of its own
 *   dates.dateTime(row.dueAt)                 // "Thu 10 Dec 2026, 23:59"
 *
 * The words come from shared/utils/date-display.ts; this only picks the zone.
 */
export function useDateDisplay(courseZone?: MaybeRefOrGetter<string | null | undefined>) {
  const provided = injectCourseZone()
  const own = useTimeZone()
  const zone = computed(() => toValue(courseZone) || provided?.value || own.value)
  return {
    zone,
    date: (value: DateInput) => displayDate(value, zone.value),
    dateTime: (value: DateInput) => displayDateTime(value, zone.value),
    day: (value: DateInput) => displayDay(value, zone.value),
    time: (value: DateInput) => displayTime(value, zone.value),
    timeSpan: (start: DateInput, end: DateInput) => displayTimeSpan(start, end, zone.value),
    daysFrom: (value: DateInput, now = new Date()) => displayDaysFrom(value, now, zone.value),
    /** Today's date ('YYYY-MM-DD') on the zone's wall clock. */
    today: (now = new Date()) => calendarDateIn(now, zone.value),
  }
}
