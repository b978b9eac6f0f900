import type { H3Event } from 'h3'
import type { PracticalScope } from '../../utils/access'
import type { Kysely, RawBuilder } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import type { Database, Submission } from '../../database/schema'
import { createError } from 'h3'
import { requirePracticalAccess, requirePracticalAccessWith } from '../../utils/access'
import { requireRole } from '../../utils/auth'
import { useDb } from '../../utils/db'

// Who reviews: the course's instructors (every section) and the TAs of the sections running a
// practical (their sections only). The coordinator and students are refused outright (403):
// grades and submissions are not theirs. Anything outside the caller's sections is a 404.

export interface ReviewerScope extends PracticalScope {
  role: 'owner' | 'ta'
}

const reviewForbidden = () => createError({ statusCode: 403, statusMessage: 'Reviewing results is for the course’s instructors and TAs' })
const submissionNotFound = () => createError({ statusCode: 404, statusMessage: 'Submission not found' })

export async function requireReviewerOf(event: H3Event, practicalId: number): Promise<ReviewerScope> {
  requireRole(event, 'instructor', 'ta')
  return reviewerScopeOf(await requirePracticalAccess(event, practicalId))
}

/** requireReviewerOf, and what the route reads next in the same statement (requirePracticalAccessWith). */
export async function requireReviewerWith<T>(
  event: H3Event, practicalId: number, columns: (me: SessionUser) => RawBuilder<T>,
): Promise<{ scope: ReviewerScope, columns: T }> {
  requireRole(event, 'instructor', 'ta')
  const read = await requirePracticalAccessWith(event, practicalId, columns)
  return { scope: reviewerScopeOf(read.scope), columns: read.columns }
}

function reviewerScopeOf(scope: PracticalScope): ReviewerScope {
  if (scope.role !== 'owner' && scope.role !== 'ta') throw reviewForbidden()
  return scope as ReviewerScope
}

/** The sections whose submissions the caller reviews; null means all of the course's. */
export function reviewSectionIds(scope: ReviewerScope): number[] | null {
  return scope.role === 'owner' ? null : (scope.sectionIds ?? [])
}

/** One submission in the caller's review scope, or 404 (403 for roles that never review). */
export async function requireReviewableSubmission(
  event: H3Event, submissionId: number,
): Promise<{ scope: ReviewerScope, submission: Submission }> {
  requireRole(event, 'instructor', 'ta')
  const db = useDb()
  const head = await db.selectFrom('submissions').select('practicalId').where('id', '=', submissionId).executeTakeFirst()
  if (!head) throw submissionNotFound()
  const scope = await requireReviewerOf(event, head.practicalId)
  const sections = reviewSectionIds(scope)
  let query = db.selectFrom('submissions').selectAll().where('id', '=', submissionId).where('practicalId', '=', scope.practical.id)
  if (sections) query = query.where('sectionId', 'in', sections.length ? sections : [-1])
  const submission = await query.executeTakeFirst()
  if (!submission) throw submissionNotFound()
  return { scope, submission }
}

/** The highest version of a submission's work unit (a review is only for that one). */
export async function latestUnitVersion(db: Kysely<Database>, submission: Pick<Submission, 'practicalId' | 'unitKey'>): Promise<number> {
  const row = await db.selectFrom('submissions').select((eb) => eb.fn.max('version').as('latest'))
    .where('practicalId', '=', submission.practicalId).where('unitKey', '=', submission.unitKey).executeTakeFirst()
  return Number(row?.latest ?? 0)
}
