import type { Kysely } from 'kysely'
import type { PracticalChemistry } from '#shared/utils/submission'
import type { PracticalScope } from '../../utils/access'
import type { Database, ReleasePolicy, RubricCriterion } from '../../database/schema'
import { todayIn } from '#shared/utils/dates'
import { unpackPeaks } from '#shared/utils/lib/stored-peaks'
import type { KeyFactor } from '#shared/utils/key-factor'
import type { ExpectationView, FlagView, PeakView, ProductView, StoredResult, SubmissionStatusName } from '#shared/types/submission'
import { scoresReleased } from '../review/release-policy'
import { expectationView, practicalChemistry } from './practical-chemistry'
import { studentUnit, type Enrolment, type StudentWorkUnit } from './student-unit'

// A student's own GC results for one practical: every version of their work unit (the pair's,
// for pair work), newest first, with what the reviewers decided. Scores and comments follow the
// course's release policy; a return's reason is always shown, since the student needs it.

export interface MyFeedbackView {
  scores: Array<{ key: string, label: string, maxPoints: number, score: number | null }>
  total: number | null
  maxTotal: number
  comment: string
}

export interface MyReviewView {
  decision: 'accept' | 'return'
  reviewedAt: string
  reviewer: string
  reason: string | null
  /** A return's due time for the next upload (ISO), when it set one. */
  resubmitDueAt: string | null
  /** False until the course's release policy lets the student see scores and comment. */
  released: boolean
  feedback: MyFeedbackView | null
}

export interface MyVersionView {
  id: number
  version: number
  status: SubmissionStatusName
  submittedAt: string
  late: boolean
  kind: 'peak-table' | 'trace'
  fileName: string
  byteSize: number
  /** Who uploaded it: the caller, or their partner by name. */
  uploadedBy: { name: string, you: boolean }
  flags: FlagView[]
  result: StoredResult
  peaks: PeakView[]
  review: MyReviewView | null
}

export interface MySubmissionsView {
  practical: {
    id: number
    title: string
    courseCode: string
    timezone: string
    workUnit: 'student' | 'pair'
    substrate: { name: string, smiles: string }
    method: { name: string, reagent: string }
  }
  /** The other members of the caller's work unit (their partner), by name. */
  partners: string[]
  dueAt: string | null
  /** The latest version was sent back: why, by whom, and when the next upload is due (as uploadDueAt). */
  sentBack: { version: number, reason: string, reviewer: string, at: string, dueAt: string | null } | null
  /** When a new upload is late: the section's due time, or a return's later one (ISO). */
  uploadDueAt: string | null
  /** New uploads are still taken after that time, and marked late. */
  pastDue: boolean
  meetingDate: string | null
  /** The section has not met yet (in the course's zone): an upload now is probably a mistake. */
  beforeMeeting: boolean
  uploadsOpen: boolean
  closedReason: string | null
  releasePolicy: ReleasePolicy
  chemistry: {
    products: Array<ProductView & { carbonClass: 'primary' | 'secondary' | 'tertiary' }>
    predicted: Array<{ smiles: string, percent: number }>
    statistical: Array<{ smiles: string, percent: number }>
    windows: Array<{ productSmiles: string, rtMin: number, rtMax: number, responseFactor: number }>
    keyFactor: KeyFactor
    literature: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
    expected: ExpectationView
    /** "dichlorides", "monobromides": what the products are, for the conversion's wording. */
    productKind: string
  }
  versions: MyVersionView[]
}

function peakViews(stored: Uint8Array): PeakView[] {
  return unpackPeaks(stored).map((p) => ({
    retentionTime: p.retentionTime,
    area: p.area,
    ...(typeof p.areaPercent === 'number' ? { areaPercent: p.areaPercent } : {}),
    ...(typeof p.height === 'number' ? { height: p.height } : {}),
    assignedTo: p.assignedTo ?? null,
  }))
}

function feedbackOf(rubric: RubricCriterion[], scores: Record<string, number>, total: number | null, comment: string): MyFeedbackView {
  return {
    scores: rubric.map((c) => ({
      key: c.key, label: c.label, maxPoints: c.maxPoints, score: typeof scores[c.key] === 'number' ? scores[c.key]! : null,
    })),
    total,
    maxTotal: rubric.reduce((sum, c) => sum + c.maxPoints, 0),
    comment,
  }
}

type LatestReview = {
  decision: 'accept' | 'return'
  reason: string | null
  comment: string
  scores: Record<string, number>
  total: number | null
  createdAt: Date
  reviewer: string
  resubmitDueAt: Date | null
}

/** The latest review of each submission, by submission id. */
async function latestReviews(db: Kysely<Database>, submissionIds: number[]) {
  const latest = new Map<number, LatestReview>()
  if (!submissionIds.length) return latest
  const rows = await db.selectFrom('reviews').innerJoin('users', 'users.id', 'reviews.reviewerId')
    .select([
      'reviews.submissionId', 'reviews.decision', 'reviews.reason', 'reviews.comment', 'reviews.scores', 'reviews.total',
      'reviews.createdAt', 'users.name as reviewer', 'reviews.resubmitDueAt',
    ])
    .where('reviews.submissionId', 'in', submissionIds)
    .orderBy('reviews.createdAt', 'desc').orderBy('reviews.id', 'desc').execute()
  for (const row of rows) if (!latest.has(row.submissionId)) latest.set(row.submissionId, row)
  return latest
}

/** Every version the caller is a member of: submission_members is the scope, in the where clause. */
function myVersionRows(db: Kysely<Database>, userId: number, practicalId: number) {
  return db.selectFrom('submissions')
    .innerJoin('submissionMembers', 'submissionMembers.submissionId', 'submissions.id')
    .innerJoin('files', 'files.id', 'submissions.fileId')
    .innerJoin('users', 'users.id', 'submissions.submittedBy')
    .select([
      'submissions.id', 'submissions.version', 'submissions.status', 'submissions.createdAt', 'submissions.late',
      'submissions.inputKind', 'submissions.flags', 'submissions.result', 'submissions.peaks', 'submissions.submittedBy',
      'files.originalName', 'files.byteSize', 'users.name as submitterName',
    ])
    .where('submissionMembers.userId', '=', userId)
    .where('submissions.practicalId', '=', practicalId)
    .orderBy('submissions.createdAt', 'desc').orderBy('submissions.version', 'desc')
    .execute()
}

type MyVersionRow = Awaited<ReturnType<typeof myVersionRows>>[number]

/** The decision on a version as the student sees it: scores and comment only once released. */
function myReviewView(review: LatestReview | undefined, released: boolean, rubric: RubricCriterion[]): MyReviewView | null {
  if (!review) return null
  return {
    decision: review.decision,
    reviewedAt: review.createdAt.toISOString(),
    reviewer: review.reviewer,
    reason: review.reason,
    resubmitDueAt: review.resubmitDueAt?.toISOString() ?? null,
    released,
    feedback: released ? feedbackOf(rubric, review.scores ?? {}, review.total, review.comment) : null,
  }
}

function myVersionView(row: MyVersionRow, meId: number, review: MyReviewView | null): MyVersionView {
  return {
    id: row.id,
    version: row.version,
    status: row.status,
    submittedAt: row.createdAt.toISOString(),
    late: row.late,
    kind: row.inputKind,
    fileName: row.originalName,
    byteSize: row.byteSize,
    uploadedBy: { name: row.submitterName, you: row.submittedBy === meId },
    flags: row.flags as FlagView[],
    result: row.result as StoredResult,
    peaks: peakViews(row.peaks),
    review,
  }
}

/**
 * The "sent back" state: the newest version's latest decision is a return. Its due time is the
 * one the next upload is judged against (the return's, or the section's when that is later).
 */
function sentBackOf(newest: MyVersionRow | undefined, review: LatestReview | undefined, dueAt: Date | null): MySubmissionsView['sentBack'] {
  if (!newest || review?.decision !== 'return') return null
  return {
    version: newest.version, reason: review.reason ?? '', reviewer: review.reviewer, at: review.createdAt.toISOString(),
    dueAt: dueAt?.toISOString() ?? null,
  }
}

/** What the student's page computes against and shows beside their results. */
function myChemistryView(chemistry: PracticalChemistry): MySubmissionsView['chemistry'] {
  return {
    products: chemistry.products,
    predicted: chemistry.predicted,
    statistical: chemistry.statistical,
    windows: chemistry.windows,
    keyFactor: chemistry.keyFactor,
    literature: chemistry.literature,
    expected: expectationView(chemistry),
    productKind: chemistry.productKind,
  }
}

/** The practical's substrate and method names, its chemistry and the caller's partners' names. */
async function practicalFacts(db: Kysely<Database>, scope: PracticalScope, unit: StudentWorkUnit) {
  const { me, practical } = scope
  const [substrate, method, chemistry, partners] = await Promise.all([
    db.selectFrom('substrates').select(['name', 'smiles']).where('id', '=', practical.substrateId).executeTakeFirstOrThrow(),
    db.selectFrom('methods').select(['name', 'reagent']).where('id', '=', practical.methodId).executeTakeFirstOrThrow(),
    practicalChemistry(practical),
    db.selectFrom('users').select('name').where('id', 'in', unit.memberIds).where('id', '<>', me.id).orderBy('name').execute(),
  ])
  return { substrate, method, chemistry, partners: partners.map((p) => p.name) }
}

/**
 * Every version the caller is a member of, for a student of a section that runs the practical
 * (studentUnit: 404 otherwise). `enrolment` is read with the scope (enrolmentColumns).
 */
export async function mySubmissionsOf(
  db: Kysely<Database>, scope: PracticalScope, enrolment: Enrolment | null,
): Promise<MySubmissionsView> {
  const { me, course, practical } = scope
  const unit = await studentUnit(db, scope, enrolment)
  const { substrate, method, chemistry, partners } = await practicalFacts(db, scope, unit)
  const rows = await myVersionRows(db, me.id, practical.id)
  const reviews = await latestReviews(db, rows.map((r) => r.id))
  const facts = { reviewed: true, dueAt: unit.dueAt, practicalReleasedAt: practical.resultsReleasedAt }
  const released = scoresReleased(course.releasePolicy, facts)
  const open = chemistry.windows.length > 0
  return {
    practical: {
      id: practical.id, title: practical.title, courseCode: course.code, timezone: course.timezone, workUnit: practical.workUnit,
      substrate, method,
    },
    partners,
    dueAt: unit.dueAt?.toISOString() ?? null,
    sentBack: sentBackOf(rows[0], rows[0] ? reviews.get(rows[0].id) : undefined, unit.uploadDueAt),
    uploadDueAt: unit.uploadDueAt?.toISOString() ?? null,
    pastDue: unit.uploadDueAt !== null && Date.now() > unit.uploadDueAt.getTime(),
    meetingDate: unit.meetingDate,
    beforeMeeting: unit.meetingDate !== null && unit.meetingDate > todayIn(course.timezone),
    uploadsOpen: open,
    closedReason: open ? null : 'This practical has no retention windows yet; ask your instructor to set them.',
    releasePolicy: course.releasePolicy,
    chemistry: myChemistryView(chemistry),
    versions: rows.map((row) => myVersionView(row, me.id, myReviewView(reviews.get(row.id), released, course.rubric ?? []))),
  }
}
