import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { StockroomTables } from './schema-stockroom'
import type { DigestTables } from './schema-digests'
import type { LibraryDataTables } from './schema-library'
import type { RosterSkippedRow, RosterSummary } from '../../shared/types/roster'

// Timestamps come back from pg as Date and go in as Date or ISO text.
type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type UpdatedAt = ColumnType<Date, Date | string | undefined, Date | string>
type Json<T = unknown> = ColumnType<T, string, string>

export type Role = 'instructor' | 'ta' | 'coordinator' | 'student'

export interface UsersTable {
  id: Generated<number>
  email: string
  name: string
  role: Role
  passwordHash: string | null
  /** First campus sign-in. Joined = a password set or this (roster/invitations.ts `hasJoined`). */
  campusJoinedAt: Timestamp | null
  sessionVersion: Generated<number>
  disabledAt: Timestamp | null
  /** Whether the person gets the daily summary of new runs in their sections (TAs); opt-out. */
  dailySummary: Generated<boolean>
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface LoginAttemptsTable {
  id: Generated<number>
  email: string
  ip: string
  /** null while the password is being checked (the attempt already counts). */
  succeeded: boolean | null
  createdAt: CreatedAt
}

/** A campus (OpenID Connect) sign-in started and not yet, or already, finished. */
export interface CampusSignInRequestsTable {
  id: Generated<number>
  stateHash: string
  /** Hash of the random value in the starting browser's cookie: the callback must come from it. */
  browserHash: string
  nonce: string
  codeVerifier: string
  nextPath: string
  createdAt: CreatedAt
  usedAt: Timestamp | null
}

export interface AuditLogTable {
  id: Generated<number>
  actorId: number | null
  action: string
  entity: string
  entityId: string | null
  before: Json | null
  after: Json | null
  ip: string | null
  createdAt: CreatedAt
}

export type MailStatus = 'queued' | 'sending' | 'sent' | 'retrying' | 'failed'

export interface MailAttachment {
  filename: string
  contentType: string
  /** base64 */
  content: string
}

export interface MailMessagesTable {
  id: Generated<number>
  dedupeKey: string
  kind: string
  toAddresses: string[]
  subject: string
  textBody: string
  htmlBody: string | null
  attachments: Json<MailAttachment[]>
  status: Generated<MailStatus>
  attempts: Generated<number>
  lastError: string | null
  providerMessageId: string | null
  createdBy: number | null
  scheduledAt: Timestamp | null
  sentAt: Timestamp | null
  courseId: number | null
  /** The presence key of the server process sending it (status 'sending'), else null. */
  claimedBy: number | null
  claimedAt: Timestamp | null
  /** Attempts whose outcome was never known; each was followed by one with the same Message-ID. */
  unknownOutcomes: Generated<number>
  /** Where answers go (the sender), and who gets a copy. */
  replyTo: string | null
  ccAddresses: Generated<string[]>
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export type OutlierTest = 'gesd' | 'grubbs' | 'dixon' | 'modified-z'
export type ReleasePolicy = 'on-review' | 'after-due' | 'manual'

export interface RubricCriterion {
  key: string
  label: string
  maxPoints: number
  /** 'accuracy' criteria get a suggested score from the tolerance against the literature value. */
  kind: 'accuracy' | 'manual'
}

export interface CoursesTable {
  id: Generated<number>
  code: string
  title: string
  term: string
  timezone: Generated<string>
  outlierTest: Generated<OutlierTest>
  outlierAlpha: Generated<number>
  zscoreLimit: Generated<number>
  accuracyTolerancePercent: Generated<number>
  releasePolicy: Generated<ReleasePolicy>
  /** Days a return gives the work unit to upload again, unless the reviewer sets the time. */
  resubmitDays: Generated<number>
  rubric: ColumnType<RubricCriterion[], string | undefined, string>
  createdBy: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface CourseOwnersTable {
  courseId: number
  userId: number
}

/** DATE columns are kept as 'YYYY-MM-DD' text (see connection.ts); TIME as 'HH:MM:SS'. */
export interface SectionsTable {
  id: Generated<number>
  courseId: number
  code: string
  weekday: number
  startTime: string
  endTime: string
  room: string
  hoodStations: number
  studentsPerStation: Generated<number>
  firstDate: string
  lastDate: string
  skippedDates: ColumnType<string[], string[] | undefined, string[]>
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface SectionTasTable {
  sectionId: number
  userId: number
}

export type EnrollmentStatus = 'active' | 'withdrawn'

export interface EnrollmentsTable {
  id: Generated<number>
  courseId: number
  sectionId: number
  userId: number
  status: Generated<EnrollmentStatus>
  station: number | null
  seat: number | null
  /** The registrar's id for the student in this course, as the roster file gave it. */
  studentId: string | null
  createdAt: CreatedAt
  withdrawnAt: Timestamp | null
}

export interface InvitationsTable {
  id: Generated<number>
  userId: number
  tokenHash: string
  expiresAt: Timestamp
  usedAt: Timestamp | null
  createdBy: number | null
  createdAt: CreatedAt
}

export interface FilesTable {
  id: Generated<number>
  sha256: string
  byteSize: number
  mediaType: string
  originalName: string
  content: Buffer
  uploadedBy: number | null
  createdAt: CreatedAt
}

export interface RosterImportsTable {
  id: Generated<number>
  courseId: number
  fileId: number
  mapping: Json<Record<string, string | null>>
  summary: Json<RosterSummary>
  /** Rows the import left out, with why (they can be downloaded, fixed and imported again). */
  skipped: ColumnType<RosterSkippedRow[], string | undefined, string>
  createdBy: number | null
  createdAt: CreatedAt
}

export interface SubstratesTable {
  id: Generated<number>
  name: string
  smiles: string
  formula: string
  molarMass: number
  density: number | null
  boilingPointC: number | null
  /** CAS Registry Number, optional. */
  casNumber: Generated<string | null>
  notes: Generated<string>
  source: Generated<string>
  ownerId: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export type WindowKind = 'product' | 'solvent' | 'starting-material'

export interface SubstrateWindowsTable {
  id: Generated<number>
  substrateId: number
  kind: WindowKind
  productSmiles: string | null
  label: string
  rtMin: number
  rtMax: number
  responseFactor: Generated<number>
}

export interface StandardRunsTable {
  id: Generated<number>
  substrateId: number
  fileId: number
  peaks: Json
  createdBy: number | null
  createdAt: CreatedAt
}

export type MethodReagent = 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs'

export interface MethodsTable {
  id: Generated<number>
  name: string
  reagent: MethodReagent
  halogen: 'Cl' | 'Br'
  temperatureC: number
  rPrimary: number
  rSecondary: number
  rTertiary: number
  source: string
  notes: Generated<string>
  ownerId: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface PracticalsTable {
  id: Generated<number>
  courseId: number
  title: string
  substrateId: number
  methodId: number
  workUnit: Generated<'student' | 'pair'>
  notes: Generated<string>
  resultsReleasedAt: Timestamp | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export type ItemRole = 'substrate' | 'halogenating-agent' | 'initiator' | 'solvent' | 'wash' | 'drying-agent' | 'other'
export type ItemBasis = 'mmol' | 'equivalents' | 'mol-percent' | 'mL' | 'g'

export interface PracticalItemsTable {
  id: Generated<number>
  practicalId: number
  position: number
  role: ItemRole
  name: string
  smiles: string | null
  molarMass: number | null
  density: number | null
  basis: ItemBasis
  amount: number
  /** The catalog reagent the item draws on (set by the stockroom); null until linked. */
  reagentId: number | null
  /** Percent w/v (g per 100 mL), when the item is a solution made up with water from that (solid) reagent. */
  solutionPercentWv: number | null
  /** CAS Registry Number, optional (the stockroom proposes links on it). */
  casNumber: Generated<string | null>
}

export interface PracticalSessionsTable {
  id: Generated<number>
  practicalId: number
  sectionId: number
  meetingDate: string
  dueAt: Timestamp
}

export interface CalendarFeedsTable {
  userId: number
  /** SHA-256 (hex) of the feed's token; the token itself is never stored. */
  tokenHash: string
  /** The token is HMAC(key from the server secret, seed); null for a token from before seeds. */
  tokenSeed: Buffer | null
  createdAt: CreatedAt
}

/** Tokens of feeds that were reset: their URLs answer 410 Gone. */
export interface CalendarFeedRevocationsTable {
  tokenHash: string
  userId: number
  revokedAt: CreatedAt
}

export type SubmissionStatus = 'pending' | 'accepted' | 'returned'

export interface StoredFlag {
  code: string
  severity: 'info' | 'warning' | 'danger'
  message: string
}

export interface SubmissionsTable {
  id: Generated<number>
  practicalId: number
  sectionId: number
  unitKey: string
  version: number
  fileId: number
  inputKind: 'peak-table' | 'trace'
  sha256: string
  /** The peaks, packed column by column (shared/utils/lib/stored-peaks.ts); empty for none. */
  peaks: ColumnType<Buffer, Buffer | undefined, Buffer>
  result: Json
  flags: Json<StoredFlag[]>
  attention: Generated<number>
  factorSecondary: number | null
  factorTertiary: number | null
  status: Generated<SubmissionStatus>
  late: Generated<boolean>
  submittedBy: number
  idempotencyKey: string | null
  excludedAt: Timestamp | null
  excludedBy: number | null
  exclusionReason: string | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface SubmissionMembersTable {
  submissionId: number
  userId: number
}

export interface ReviewsTable {
  id: Generated<number>
  submissionId: number
  reviewerId: number
  decision: 'accept' | 'return'
  reason: string | null
  comment: Generated<string>
  scores: Json<Record<string, number>>
  total: number | null
  /** A return's due time for the unit's next upload; null on accepts and older returns. */
  resubmitDueAt: Timestamp | null
  createdAt: CreatedAt
}

export interface Database extends StockroomTables, DigestTables, LibraryDataTables {
  submissions: SubmissionsTable
  submissionMembers: SubmissionMembersTable
  reviews: ReviewsTable
  users: UsersTable
  loginAttempts: LoginAttemptsTable
  campusSignInRequests: CampusSignInRequestsTable
  auditLog: AuditLogTable
  mailMessages: MailMessagesTable
  courses: CoursesTable
  courseOwners: CourseOwnersTable
  sections: SectionsTable
  sectionTas: SectionTasTable
  enrollments: EnrollmentsTable
  invitations: InvitationsTable
  files: FilesTable
  rosterImports: RosterImportsTable
  substrates: SubstratesTable
  substrateWindows: SubstrateWindowsTable
  standardRuns: StandardRunsTable
  methods: MethodsTable
  practicals: PracticalsTable
  practicalItems: PracticalItemsTable
  practicalSessions: PracticalSessionsTable
  calendarFeeds: CalendarFeedsTable
  calendarFeedRevocations: CalendarFeedRevocationsTable
}

export type User = Selectable<UsersTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
export type MailMessage = Selectable<MailMessagesTable>
export type NewMailMessage = Insertable<MailMessagesTable>
export type Course = Selectable<CoursesTable>
export type Section = Selectable<SectionsTable>
export type Enrollment = Selectable<EnrollmentsTable>
export type Substrate = Selectable<SubstratesTable>
export type SubstrateWindow = Selectable<SubstrateWindowsTable>
export type Method = Selectable<MethodsTable>
export type Practical = Selectable<PracticalsTable>
export type PracticalItem = Selectable<PracticalItemsTable>
export type PracticalSession = Selectable<PracticalSessionsTable>
export type Submission = Selectable<SubmissionsTable>
export type Review = Selectable<ReviewsTable>
