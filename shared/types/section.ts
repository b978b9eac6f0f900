import { z } from 'zod'

const date = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use YYYY-MM-DD')
const time = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d(:[0-5]\d)?$/, 'Use HH:MM (24-hour)')

export const WEEKDAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const

export const sectionInputSchema = z.object({
  code: z.string().trim().min(1, 'Enter a section code').max(20),
  weekday: z.number().int().min(1, 'Pick a weekday').max(7),
  startTime: time,
  endTime: time,
  room: z.string().trim().min(1, 'Enter the room').max(80),
  hoodStations: z.number().int('Whole stations only').min(1, 'At least one station').max(200),
  studentsPerStation: z.number().int().min(1).max(4).default(2),
  firstDate: date,
  lastDate: date,
  skippedDates: z.array(date).max(60).default([]),
  taIds: z.array(z.number().int().positive()).max(10).default([]),
  /** Save despite conflicts the instructor has seen. */
  confirmConflicts: z.boolean().default(false),
}).superRefine((s, ctx) => {
  if (s.endTime.slice(0, 5) <= s.startTime.slice(0, 5)) ctx.addIssue({ code: 'custom', path: ['endTime'], message: 'End after the start' })
  if (s.lastDate < s.firstDate) ctx.addIssue({ code: 'custom', path: ['lastDate'], message: 'On or after the first date' })
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
    practicals: Array<{ id: number, title: string, meetingDate: string, dueAt: string, substrate: string, method: string }>
  }>
}
