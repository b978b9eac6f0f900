// Moving a course's timetable into another term. Pure: dates are 'YYYY-MM-DD' calendar days,
// instants are re-made from their wall clock in the course's zone.
//
// Everything moves by the same whole number of weeks, so every section keeps its weekday and
// every practical keeps its place in the term (week 3 stays week 3). The number of weeks is the
// smallest one that puts the old term's first section date on or after the new term's start.
import { format } from 'date-fns'
import { tz } from '@date-fns/tz'
import { addDays, daysBetween, isoDateOf, isoWeekday, zonedInstant } from './dates'

export interface NewTerm {
  /** 'YYYY-MM-DD', inclusive. */
  start: string
  end: string
}

export interface SectionDates {
  id: number
  code: string
  weekday: number
  firstDate: string
  lastDate: string
  skippedDates: string[]
}

export interface SessionDates {
  practicalId: number
  sectionId: number
  meetingDate: string
  dueAt: Date | string
}

export interface ShiftedSection {
  id: number
  firstDate: string
  lastDate: string
  /** The old last date fell after the new term's end, so the section ends earlier. */
  shortened: boolean
}

export interface ShiftedSession {
  practicalId: number
  sectionId: number
  oldMeetingDate: string
  meetingDate: string
  dueAt: Date
}

export interface DroppedSession {
  practicalId: number
  sectionId: number
  oldMeetingDate: string
  /** Where it would have landed: after the section's last meeting in the new term. */
  meetingDate: string
}

export interface TermShift {
  /** Days moved, a multiple of 7 (negative for an earlier term). */
  days: number
  weeks: number
  sections: ShiftedSection[]
  sessions: ShiftedSession[]
  dropped: DroppedSession[]
}

/** Days to move by: whole weeks, the fewest that bring `oldStart` to or after `newStart`. */
export function shiftDaysBetween(oldStart: string, newStart: string): number {
  return 7 * Math.ceil(daysBetween(oldStart, newStart) / 7)
}

/** The latest date on or before `date` that falls on the ISO weekday. */
function lastWeekdayOnOrBefore(date: string, weekday: number): string {
  return addDays(date, -((isoWeekday(date) - weekday + 7) % 7))
}

/** An instant moved by whole days keeping its wall clock in the zone (23:59 stays 23:59 across a DST change). */
export function shiftInstant(at: Date | string, days: number, timezone: string): Date {
  const instant = new Date(at)
  const time = format(instant, 'HH:mm', { in: tz(timezone) })
  return zonedInstant(addDays(isoDateOf(instant, timezone), days), time, timezone)
}

/**
 * The sections and practical sessions moved into the new term. A section whose moved last date
 * passes the term's end ends on its last weekday before it; a session that then falls after its
 * section's last date is dropped (and listed). Skipped dates belong to the old term's calendar
 * and are not moved. The caller refuses a term in which a section would not meet at all.
 */
export function shiftTimetable(sections: SectionDates[], sessions: SessionDates[], term: NewTerm, timezone: string): TermShift {
  if (!sections.length) return { days: 0, weeks: 0, sections: [], sessions: [], dropped: [] }
  const oldStart = sections.map((s) => s.firstDate).sort()[0]!
  const days = shiftDaysBetween(oldStart, term.start)
  const moved = sections.map((s): ShiftedSection => {
    const lastDate = addDays(s.lastDate, days)
    const shortened = lastDate > term.end
    const last = shortened ? lastWeekdayOnOrBefore(term.end, s.weekday) : lastDate
    return { id: s.id, firstDate: addDays(s.firstDate, days), lastDate: last, shortened }
  })
  const lastOf = new Map(moved.map((s) => [s.id, s.lastDate]))
  const kept: ShiftedSession[] = []
  const dropped: DroppedSession[] = []
  for (const s of sessions) {
    const meetingDate = addDays(s.meetingDate, days)
    const base = { practicalId: s.practicalId, sectionId: s.sectionId, oldMeetingDate: s.meetingDate, meetingDate }
    const last = lastOf.get(s.sectionId)
    if (last === undefined || meetingDate > last) dropped.push(base)
    else kept.push({ ...base, dueAt: shiftInstant(s.dueAt, days, timezone) })
  }
  return { days, weeks: days / 7, sections: moved, sessions: kept, dropped }
}
