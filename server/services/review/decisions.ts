import { sql, type Kysely, type Transaction } from 'kysely'
import type { ReviewerScope } from './scope'
import type { Database, Submission } from '../../database/schema'
import type { BulkAcceptResult, ExclusionView, QueueRow, ReviewSaved } from '#shared/types/review'
import type { reviewInputSchema } from '#shared/types/submission'
import type { z } from 'zod'
import { criteriaToMark, judgedScores, rubricScoreIssues, rubricTotal } from '#shared/utils/grading'
import { createError } from 'h3'
import { latestUnitVersion } from './scope'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import { defaultResubmitDue, resubmitDueProblem } from '#shared/utils/resubmit'
import { queueReturnMail } from './return-mail'

// Review decisions, bulk acceptance and exclusions: commands on the database, by an Actor. Each
// write takes the work unit's lock, checks again inside the transaction that the version is still
// the latest, and writes its audit row with before and after in the same transaction. An upload
// takes no lock (one statement, numbered by the unique version): one committing during a decision
// is simply the next version, as if it had come just after.

type ReviewBody = z.output<typeof reviewInputSchema>

async function lockReviewUnit(trx: Transaction<Database>, s: Pick<Submission, 'practicalId' | 'unitKey'>) {
  await sql`select pg_advisory_xact_lock(hashtext(${`submission:${s.practicalId}:${s.unitKey}`}))`.execute(trx)
}

async function lastReviewOf(trx: Transaction<Database>, submissionId: number) {
  return trx.selectFrom('reviews').select(['id', 'decision', 'reason', 'comment', 'scores', 'total', 'resubmitDueAt'])
    .where('submissionId', '=', submissionId)
    .orderBy('createdAt', 'desc').orderBy('id', 'desc').limit(1).executeTakeFirst()
}

interface Decision {
  decision: 'accept' | 'return'
  reason: string | null
  comment: string
  scores: Record<string, number>
  total: number | null
  resubmitDueAt?: Date | null
  bulk?: boolean
}

/** Inside a transaction holding the unit's lock: status, review row and audit row. */
async function writeDecision(trx: Transaction<Database>, actor: Actor, submission: Submission, d: Decision): Promise<number> {
  const before = await trx.selectFrom('submissions').select('status').where('id', '=', submission.id).forUpdate().executeTakeFirstOrThrow()
  const previous = await lastReviewOf(trx, submission.id)
  const status = d.decision === 'accept' ? 'accepted' as const : 'returned' as const
  await trx.updateTable('submissions').set({ status, updatedAt: new Date() }).where('id', '=', submission.id).execute()
  const review = await trx.insertInto('reviews').values({
    submissionId: submission.id,
    reviewerId: actor.id,
    decision: d.decision,
    reason: d.reason,
    comment: d.comment,
    scores: JSON.stringify(d.scores),
    total: d.total,
    resubmitDueAt: d.resubmitDueAt ?? null,
  }).returning('id').executeTakeFirstOrThrow()
  await audit(trx, actor, {
    action: `submission.${d.decision}`,
    entity: 'submission',
    entityId: submission.id,
    before: { status: before.status, scores: previous?.scores ?? null, total: previous?.total ?? null },
    after: {
      status, scores: d.scores, total: d.total, reason: d.reason, comment: d.comment, reviewId: review.id,
      ...(d.resubmitDueAt ? { resubmitDueAt: d.resubmitDueAt.toISOString() } : {}),
      ...(d.bulk ? { bulk: true } : {}),
    },
  })
  return review.id
}

/** What a review needs besides its input: the product's address for the return's link, and the clock. */
export interface ReviewContext {
  appUrl: string
  now?: Date
}

/** A return's due time for the next upload: the reviewer's, else the course's days from now; refused when past or too far. */
function returnDueAt(scope: ReviewerScope, input: ReviewBody, now: Date): Date {
  const { resubmitDays, timezone } = scope.course
  const due = input.resubmitDueAt ? new Date(input.resubmitDueAt) : defaultResubmitDue(now, resubmitDays, timezone)
  const problem = resubmitDueProblem(due, now)
  if (problem) invalid([{ field: 'resubmitDueAt', message: problem }])
  return due
}

type LastReview = NonNullable<Awaited<ReturnType<typeof lastReviewOf>>>

/** The same return sent again (a retried request, a double click): same reason and comment, and the same due time if one is given. */
function isRepeatedReturn(last: LastReview | undefined, reason: string, input: ReviewBody): last is LastReview {
  if (last?.decision !== 'return' || last.reason !== reason || last.comment !== input.comment) return false
  return !input.resubmitDueAt || last.resubmitDueAt?.getTime() === Date.parse(input.resubmitDueAt)
}

/**
 * Accepts (rubric scores, total computed here) or returns (reason, new due time) the latest
 * version of a unit. A return mails every member of the unit once; the same return sent again
 * answers the first one and writes and mails nothing.
 */
export async function saveSubmissionReview(
  db: Kysely<Database>, actor: Actor, scope: ReviewerScope, submission: Submission, input: ReviewBody, context: ReviewContext,
): Promise<ReviewSaved> {
  const rubric = scope.course.rubric
  const accept = input.decision === 'accept'
  // A return carries no grade: its reason and comment are what the student needs.
  const scores = accept ? input.scores : {}
  const issues = rubricScoreIssues(rubric, scores, { requireAll: accept })
  if (issues.length) invalid(issues)
  if (accept && submission.attention >= 2 && !input.comment) {
    invalid([{ field: 'comment', message: 'This run has a blocking flag: say in the comment why you accept it' }])
  }
  const total = accept ? rubricTotal(rubric, scores) : null
  const dueAt = accept ? null : returnDueAt(scope, input, context.now ?? new Date())
  const saved = await db.transaction().execute(async (trx) => {
    await lockReviewUnit(trx, submission)
    const latest = await latestUnitVersion(trx, submission)
    if (latest !== submission.version) {
      throw createError({ statusCode: 409, statusMessage: `Only the latest version can be reviewed: version ${latest} is newer` })
    }
    if (accept) {
      const accepted = { decision: 'accept' as const, reason: null, comment: input.comment, scores, total }
      const reviewId = await writeDecision(trx, actor, submission, accepted)
      return { reviewId, dueAt: null }
    }
    const reason = input.reason!
    const last = await lastReviewOf(trx, submission.id)
    if (isRepeatedReturn(last, reason, input)) return { reviewId: last.id, dueAt: last.resubmitDueAt }
    const reviewId = await writeDecision(trx, actor, submission, {
      decision: 'return', reason, comment: input.comment, scores, total, resubmitDueAt: dueAt,
    })
    await queueReturnMail(trx, actor.id, scope, {
      reviewId, submissionId: submission.id, version: submission.version, reason, comment: input.comment, dueAt: dueAt!,
      reviewer: actor.name, appUrl: context.appUrl,
    })
    return { reviewId, dueAt }
  })
  return {
    id: submission.id, status: accept ? 'accepted' : 'returned', reviewId: saved.reviewId, scores, total,
    resubmitDueAt: saved.dueAt?.toISOString() ?? null,
  }
}

function bulkSkipReason(row: QueueRow | undefined): string | null {
  if (!row) return 'Not in your queue: not found, or not the latest version of its work unit'
  if (row.status !== 'pending') return `Already ${row.status}`
  if (row.excluded) return 'Excluded from the class statistics: review it on its own'
  if (row.flags.some((f) => f.code === 'outlier')) return 'An outlier by the class test: review it on its own'
  if (row.attention > 0) return 'Has flags to look at: review it on its own'
  return null
}

/** The queue as the reviewer sees it now: its rows, and the expected key factor accuracy is scored against. */
export interface BulkAcceptQueue {
  rows: QueueRow[]
  expected: number | null
}

type Scores = Record<string, number>

/** Which asked-for rows may be accepted in bulk, with their scores, and why the others may not. */
function chooseCleanRows(scope: ReviewerScope, queue: BulkAcceptQueue, ids: number[], given: Scores) {
  const rubric = scope.course.rubric
  const byId = new Map(queue.rows.map((r) => [r.id, r]))
  const skipped: BulkAcceptResult['skipped'] = []
  const chosen: Array<{ id: number, scores: Scores }> = []
  const tolerancePercent = scope.course.accuracyTolerancePercent
  for (const id of new Set(ids)) {
    const row = byId.get(id)
    const skip = bulkSkipReason(row)
    if (skip) { skipped.push({ id, reason: skip }); continue }
    const scores = judgedScores(rubric, { observed: row!.keyFactor, expected: queue.expected, tolerancePercent }, given)
    const unjudged = rubric.some((c) => c.kind === 'accuracy' && scores[c.key] === undefined)
    if (unjudged) {
      skipped.push({ id, reason: 'No selectivity to score accuracy from: review it on its own' })
      continue
    }
    chosen.push({ id, scores })
  }
  return { chosen, skipped }
}

/**
 * Accepts only clean rows (latest, pending, no warning or blocking flag, no outlier, not
 * excluded) with the suggested accuracy score. Criteria that need a person's reading stay empty
 * ("to mark") unless `given`; the total waits until every criterion has a score.
 */
export async function acceptCleanInBulk(
  db: Kysely<Database>, actor: Actor, scope: ReviewerScope, queue: BulkAcceptQueue, ids: number[], given: Scores,
): Promise<BulkAcceptResult> {
  const rubric = scope.course.rubric
  const issues = rubricScoreIssues(rubric, given)
  if (issues.length) invalid(issues)
  const { chosen, skipped } = chooseCleanRows(scope, queue, ids, given)
  const result: BulkAcceptResult = { accepted: [], skipped }
  await db.transaction().execute(async (trx) => {
    for (const { id, scores } of chosen) {
      const submission = await trx.selectFrom('submissions').selectAll().where('id', '=', id).executeTakeFirstOrThrow()
      await lockReviewUnit(trx, submission)
      const fresh = await trx.selectFrom('submissions').select('status').where('id', '=', id).executeTakeFirstOrThrow()
      if (await latestUnitVersion(trx, submission) !== submission.version || fresh.status !== 'pending') {
        result.skipped.push({ id, reason: 'Changed while accepting: review it on its own' })
        continue
      }
      const toMark = criteriaToMark(rubric, scores).map((c) => c.key)
      const total = toMark.length ? null : rubricTotal(rubric, scores)
      await writeDecision(trx, actor, submission, { decision: 'accept', reason: null, comment: '', scores, total, bulk: true })
      result.accepted.push({ id, scores, total, toMark })
    }
  })
  return result
}

/** Excludes a run from the class statistics (reason given) or counts it again (reason null). */
export async function setSubmissionExclusion(
  db: Kysely<Database>, actor: Actor, submission: Submission, reason: string | null,
): Promise<{ id: number, excluded: ExclusionView | null }> {
  const me = actor
  const at = new Date()
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('submissions').select(['excludedAt', 'exclusionReason', 'excludedBy'])
      .where('id', '=', submission.id).forUpdate().executeTakeFirstOrThrow()
    if (reason === null && before.excludedAt === null) return
    await trx.updateTable('submissions').set(reason === null
      ? { excludedAt: null, excludedBy: null, exclusionReason: null, updatedAt: at }
      : { excludedAt: at, excludedBy: me.id, exclusionReason: reason, updatedAt: at }).where('id', '=', submission.id).execute()
    await audit(trx, actor, {
      action: reason === null ? 'submission.include' : 'submission.exclude',
      entity: 'submission',
      entityId: submission.id,
      before: { excluded: before.excludedAt !== null, reason: before.exclusionReason, by: before.excludedBy },
      after: { excluded: reason !== null, reason, by: reason === null ? null : me.id },
    })
  })
  return { id: submission.id, excluded: reason === null ? null : { at: at.toISOString(), by: me.name, reason } }
}
