import { z } from 'zod'
import { daysBetween } from '../utils/dates'
import { calendarDateProblem, dateField, lineText, MAX_TERM_DAYS, recordId } from './fields'

const time = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d(:[0-5]\d)?$/, 'Use HH:MM (24-hour)')

export { WEEKDAYS } from './lib/labels'

export const sectionInputSchema = z.object({
  code: lineText(20, 'Enter a section code'),
  weekday: z.number().int().min(1, 'Pick a weekday').max(7),
  startTime: time,
  endTime: time,
  room: lineText(80, 'Enter the room'),
  hoodStations: z.number().int('Whole stations only').min(1, 'At least one station').max(200),
  studentsPerStation: z.number().int().min(1).max(4).default(2),
  firstDate: dateField(),
  lastDate: dateField(),
  skippedDates: z.array(dateField()).max(60, 'At most 60 skipped dates').default([]),
  taIds: z.array(recordId('Pick teaching assistants from the list')).max(10, 'At most 10 teaching assistants').default([]),
  /** Save despite conflicts the instructor has seen. */
  confirmConflicts: z.boolean().default(false),
}).superRefine((s, ctx) => {
  if (s.endTime.slice(0, 5) <= s.startTime.slice(0, 5)) ctx.addIssue({ code: 'custom', path: ['endTime'], message: 'End after the start' })
  if (calendarDateProblem(s.firstDate) || calendarDateProblem(s.lastDate)) return
  if (s.lastDate < s.firstDate) ctx.addIssue({ code: 'custom', path: ['lastDate'], message: 'On or after the first date' })
  else if (daysBetween(s.firstDate, s.lastDate) > MAX_TERM_DAYS) {
    ctx.addIssue({ code: 'custom', path: ['lastDate'], message: `At most ${MAX_TERM_DAYS} days after the first date` })
  }
  s.skippedDates.forEach((d, i) => {
    if (!calendarDateProblem(d) && (d < s.firstDate || d > s.lastDate)) {
      ctx.addIssue({ code: 'custom', path: ['skippedDates', i], message: 'Between the first and the last date' })
    }
  })
})
export type SectionInput = z.input<typeof sectionInputSchema>

export interface MeetingView {
  date: string
  start: string
  end: string
}

export interface SectionView {
  id: number
  courseId: number
  code: string
  weekday: number
  startTime: string
  endTime: string
  room: string
  hoodStations: number
  studentsPerStation: number
  firstDate: string
  lastDate: string
  skippedDates: string[]
  tas: Array<{ id: number, name: string }>
  enrolled: number
  meetings: MeetingView[]
}

export interface ConflictView {
  kind: 'ta-overlap' | 'room-overlap' | 'capacity'
  sectionIds: number[]
  dates: string[]
  message: string
}

export interface SectionListItem extends SectionView {
  course: { id: number, code: string, title: string, term: string }
}

export interface ScheduleEntry {
  date: string
  start: string
  end: string
  sectionId: number
  sectionCode: string
  courseId: number
  courseCode: string
  /** The course's zone: start and end are instants, shown in local lab time. */
  timezone: string
  room: string
  enrolled: number
  tas: string[]
  practicals: Array<{ id: number, title: string }>
}

export interface MyLab {
  enrollments: Array<{
    course: { id: number, code: string, title: string, term: string, timezone: string }
    section: { id: number, code: string, weekday: number, startTime: string, endTime: string, room: string, tas: string[] }
    station: number | null
    seat: number | null
    partners: string[]
    meetings: MeetingView[]
    /** `reagent`: the method's reagent key, for the cautions that go with it. */
    practicals: Array<{ id: number, title: string, meetingDate: string, dueAt: string, substrate: string, method: string, reagent: string }>
  }>
}
