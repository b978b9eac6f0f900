import { z } from 'zod'
import { dateField, lineText, MAX_TERM_DAYS } from './fields'
import { daysBetween } from '../utils/dates'
import type { SectionView } from './section'

// Copying a course into a new term: what the instructor enters, and the preview they review.

export const courseCopySchema = z.object({
  term: lineText(40, 'Enter the new term, e.g. Spring 2028'),
  start: dateField(),
  end: dateField(),
  keepTas: z.boolean().default(false),
}).superRefine((input, ctx) => {
  if (input.end <= input.start) return void ctx.addIssue({ code: 'custom', path: ['end'], message: 'The term ends after it starts' })
  if (daysBetween(input.start, input.end) > MAX_TERM_DAYS) {
    ctx.addIssue({ code: 'custom', path: ['end'], message: `A term lasts at most ${MAX_TERM_DAYS} days` })
  }
})
export type CourseCopyInput = z.input<typeof courseCopySchema>

export interface CopiedSectionView extends Pick<SectionView,
  'code' | 'weekday' | 'startTime' | 'endTime' | 'room' | 'hoodStations' | 'studentsPerStation' | 'firstDate' | 'lastDate'> {
  oldFirstDate: string
  oldLastDate: string
  /** Meetings in the new term. */
  meetings: number
  shortened: boolean
  /** Names of the TAs carried over (empty unless chosen). */
  tas: string[]
}

export interface CopiedSessionView {
  section: string
  oldMeetingDate: string
  meetingDate: string
  /** ISO instant. */
  dueAt: string
}

export interface CopiedPracticalView {
  title: string
  substrate: string
  method: string
  items: number
  sessions: CopiedSessionView[]
  /** Sessions that would fall after their section's last meeting in the new term. */
  dropped: Array<{ section: string, meetingDate: string }>
}

export interface CourseCopyPreview {
  from: { id: number, code: string, title: string, term: string }
  term: string
  start: string
  end: string
  timezone: string
  /** Weeks every date moves by. */
  weeks: number
  settings: { outlierTest: string, releasePolicy: string, rubric: string[] }
  sections: CopiedSectionView[]
  practicals: CopiedPracticalView[]
  /** Rooms or kept TAs the new sections would share with other sections at the same time (checked again on the new course's page). */
  conflicts: string[]
  /** What stays with the old term, each with its count (the noun's plural adds an "s"). */
  notCopied: Array<{ noun: string, count: number, note: string }>
}
