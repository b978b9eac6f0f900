import { z } from 'zod'
import { newPasswordSchema } from './auth'
import { lineText, recordId, recordIdList } from './fields'

// Rosters, invitations and hood stations: the schemas the forms and the routes share, and the
// shapes the routes answer with.

/** The roster fields a CSV column can feed. A full name, or a first and a last name; the student id is optional. */
export const ROSTER_FIELDS = ['email', 'name', 'firstName', 'lastName', 'section', 'studentId'] as const
export type RosterField = (typeof ROSTER_FIELDS)[number]

export const ROSTER_FIELD_LABELS: Record<RosterField, string> = {
  email: 'E-mail',
  name: 'Full name',
  firstName: 'First name',
  lastName: 'Last name',
  section: 'Section code',
  studentId: 'Student ID',
}

/** Field → the column (by its header text) that feeds it; null leaves the field unmapped. */
export type RosterMapping = Record<RosterField, string | null>

// A key left out keeps the suggested column; null unmaps the field.
const column = lineText(200, 'Choose a column').nullable().optional()
export const rosterMappingSchema = z.object({
  email: column,
  name: column,
  firstName: column,
  lastName: column,
  section: column,
  studentId: column,
})

export const ROW_OUTCOMES = ['new', 'enrol', 'move', 'unchanged', 'error'] as const
export type RosterRowOutcome = (typeof ROW_OUTCOMES)[number]

export const ROW_OUTCOME_LABELS: Record<RosterRowOutcome, string> = {
  new: 'New account',
  enrol: 'Existing account, enrolled',
  move: 'Moves section',
  unchanged: 'Already there',
  error: 'Skipped: needs fixing',
}

export interface RosterRowIssue {
  field: RosterField | 'row'
  message: string
}

export interface RosterPreviewRow {
  /** The row's number in the spreadsheet: the header is row 1. */
  row: number
  email: string
  name: string
  sectionCode: string
  /** The registrar's id, '' when the file has none. */
  studentId: string
  outcome: RosterRowOutcome
  /** For a move: the section the student leaves. */
  fromSectionCode?: string
  /**
   * For a student already in the course: the file gives them an id where they had none
   * ('added'), or one different from theirs ('changed', applied only when the instructor confirms).
   */
  studentIdChange?: 'added' | 'changed'
  /** For a 'changed' id: the one they hold now. */
  previousStudentId?: string
  errors: RosterRowIssue[]
}

export interface RosterSummary {
  new: number
  enrol: number
  move: number
  unchanged: number
  errors: number
  /** Students already in the course who get the file's id, having none. */
  idsAdded: number
  /** Students already in the course whose id the file gives differently: in a preview, proposed; after an import, replaced. */
  idsChanged: number
}

export interface RosterConflictView {
  kind: 'capacity'
  sectionIds: number[]
  message: string
}

export interface RosterPreview {
  fileName: string
  columns: string[]
  mapping: RosterMapping
  /** What is wrong with the mapping itself (`mapping.email` …); rows are empty until it is fixed. */
  mappingIssues: Array<{ field: string, message: string }>
  rows: RosterPreviewRow[]
  summary: RosterSummary
  conflicts: RosterConflictView[]
}

/** A row an import left out: what it said, and every reason (kept with the import's record). */
export interface RosterSkippedRow {
  row: number
  email: string
  name: string
  sectionCode: string
  studentId: string
  reasons: string[]
}

export interface RosterImportResult {
  importId: number
  summary: RosterSummary
  skipped: RosterSkippedRow[]
  /** Changed ids the instructor did not confirm: each student keeps the id they had. */
  idsKept: number
}

export interface RosterImportHistoryItem {
  id: number
  createdAt: string
  by: string | null
  fileName: string
  summary: RosterSummary
  skipped: RosterSkippedRow[]
}

/** The optional text fields of the preview and import forms (multipart, so strings). */
export const rosterUploadFieldsSchema = z.object({
  mapping: z.string().max(4000).optional(),
  confirmConflicts: z.enum(['true', 'false']).default('false'),
  /** JSON list of the e-mails whose changed student id the instructor confirmed. */
  replaceStudentIds: z.string().max(60_000).optional(),
})

const email = z.string().trim().toLowerCase().email('Enter an e-mail address').max(254, 'At most 254 characters')
const personName = lineText(120, 'Enter the student’s name')

export const enrollmentAddSchema = z.object({
  email,
  name: personName,
  confirmConflicts: z.boolean().default(false),
})
export type EnrollmentAdd = z.input<typeof enrollmentAddSchema>

/** A TA invited from the course: their name, e-mail and the sections they will teach. */
export const taInviteSchema = z.object({
  email,
  name: lineText(120, 'Enter the TA’s name'),
  sectionIds: recordIdList(200, 'section'),
})
export type TaInvite = z.input<typeof taInviteSchema>

export interface TaInvited {
  userId: number
  /** False when the TA already had an account with a password: they are only added to the sections. */
  invited: boolean
  sectionIds: number[]
}

/** People of a course who have not set a password yet: students enrolled, TAs of its sections. */
export interface OpenInvitations {
  students: number
  tas: number
}

export interface InvitationRoundResult {
  /** Fresh links mailed in this round. */
  sent: number
  /** People this round had already mailed (the same request again). */
  alreadySent: number
}

export const enrollmentPatchSchema = z.object({
  sectionId: recordId('Pick a section from the list').optional(),
  station: z.number().int('Whole stations only').min(1, 'Stations start at 1').max(200, 'At most 200 stations').nullable().optional(),
  seat: z.number().int('Whole seats only').min(1, 'Seats start at 1').max(4, 'At most 4 seats a station').nullable().optional(),
  confirmConflicts: z.boolean().default(false),
}).superRefine((p, ctx) => {
  if ((p.station === undefined) !== (p.seat === undefined)) {
    const path = [p.station === undefined ? 'station' : 'seat']
    ctx.addIssue({ code: 'custom', path, message: 'Give the station and the seat together' })
  } else if ((p.station === null) !== (p.seat === null)) {
    ctx.addIssue({ code: 'custom', path: ['seat'], message: 'Clear the station and the seat together' })
  }
  if (p.sectionId === undefined && p.station === undefined) {
    ctx.addIssue({ code: 'custom', path: ['sectionId'], message: 'Say what to change: a section, or a station and seat' })
  }
})
export type EnrollmentPatch = z.input<typeof enrollmentPatchSchema>

/** 43 characters: 32 random bytes, base64url without padding. */
export const invitationTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'Not an invitation link')

export const invitationAcceptSchema = z.object({
  token: invitationTokenSchema,
  password: newPasswordSchema,
})
export type InvitationAccept = z.infer<typeof invitationAcceptSchema>

/** GET /api/invitations/:token */
export interface InvitationView {
  name: string
  email: string
  expiresAt: string
  /**
   * How this person will sign in: with a password they choose on the invitation page, or (where
   * password sign-in is off for them) with the campus sign-in, which accepts the invitation.
   */
  signIn: 'password' | 'campus'
  /** The campus button's label, when campus sign-in is set up. */
  campusLabel: string | null
}

export type InvitationState = 'accepted' | 'invited' | 'expired' | 'none'

export const INVITATION_STATE_LABELS: Record<InvitationState, string> = {
  accepted: 'Password set',
  invited: 'Invited',
  expired: 'Invitation expired',
  none: 'Not invited',
}

export interface RosterStudent {
  /** The enrolment's id (what PATCH /api/enrollments/:id takes). */
  id: number
  userId: number
  name: string
  email: string
  /** The registrar's id for this course, null when none was given. */
  studentId: string | null
  status: 'active' | 'withdrawn'
  station: number | null
  seat: number | null
  /** Others at the same station, in seat order. */
  partners: string[]
  invitation: { state: InvitationState, expiresAt: string | null }
  withdrawnAt: string | null
}

/** GET /api/sections/:id/roster */
export interface SectionRosterView {
  sectionId: number
  courseId: number
  code: string
  hoodStations: number
  studentsPerStation: number
  students: RosterStudent[]
}

/** POST /api/sections/:id/enrollments */
export interface EnrollmentAdded {
  enrollmentId: number
  userId: number
  /** A new account was made and an invitation e-mail queued. */
  invited: boolean
}
