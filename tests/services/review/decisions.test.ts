import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRowsOf, demoPracticalScope, insertVersion, newActor, newStudentUnit } from '../../support/services-fixtures'
import { acceptCleanInBulk, saveSubmissionReview, setSubmissionExclusion, type ReviewerScope } from '../../../server/services/review'
import type { Actor } from '../../../server/utils/audit'
import { APP_URL, stubNitroGlobals } from '../arrange'
import type { QueueRow } from '../../../shared/types/review'

afterAll(closeTestDb)
beforeAll(stubNitroGlobals)
const context = { appUrl: APP_URL }

// The review commands without HTTP: what they write, what they refuse (and then write nothing),
// and the audit row that lands with each change.

let scope: ReviewerScope
let actor: Actor

beforeAll(async () => {
  scope = { ...await demoPracticalScope(), role: 'owner' }
  actor = await newActor()
})

const fullMarks = () => Object.fromEntries(scope.course.rubric.map((c) => [c.key, c.maxPoints]))
const maxTotal = () => scope.course.rubric.reduce((sum, c) => sum + c.maxPoints, 0)

/** A fresh unit with `versions` pending versions (the newest is the one to review). */
async function freshUnit(versions = 1, extra: { attention?: number, factorSecondary?: number } = {}) {
  const { studentId, unitKey } = await newStudentUnit()
  const rows = []
  for (let v = 1; v <= versions; v++) {
    rows.push(await insertVersion({
      practicalId: scope.practical.id, sectionId: scope.sessionSectionIds[0]!, unitKey, submittedBy: studentId, version: v, ...extra,
    }))
  }
  return rows
}

const reviewsOf = (submissionId: number) => testDb().selectFrom('reviews').selectAll().where('submissionId', '=', submissionId).execute()
const statusOf = async (id: number) =>
  (await testDb().selectFrom('submissions').select('status').where('id', '=', id).executeTakeFirstOrThrow()).status

describe('saveSubmissionReview', () => {
  it('accepts with the rubric scores, computes the total, and audits who and from where', async () => {
    const [submission] = await freshUnit()
    const saved = await saveSubmissionReview(testDb(), actor, scope, submission!, {
      decision: 'accept', comment: 'Clean run', scores: fullMarks(),
    }, context)
    expect(saved).toMatchObject({ id: submission!.id, status: 'accepted', total: maxTotal() })
    expect(await statusOf(submission!.id)).toBe('accepted')
    const [review] = await reviewsOf(submission!.id)
    expect(review).toMatchObject({ reviewerId: actor.id, decision: 'accept', total: maxTotal(), id: saved.reviewId })
    const [row] = await auditRowsOf('submission', submission!.id)
    expect(row).toMatchObject({ action: 'submission.accept', actorId: actor.id, ip: actor.ip })
    expect(row!.before).toMatchObject({ status: 'pending' })
    expect(row!.after).toMatchObject({ status: 'accepted', total: maxTotal(), reviewId: saved.reviewId })
  })

  it('returns with a reason and no grade', async () => {
    const [submission] = await freshUnit()
    const saved = await saveSubmissionReview(testDb(), actor, scope, submission!, {
      decision: 'return', reason: 'The solvent peak is integrated', comment: '', scores: fullMarks(),
    }, context)
    expect(saved).toMatchObject({ status: 'returned', total: null, scores: {} })
    expect((await reviewsOf(submission!.id))[0]).toMatchObject({ decision: 'return', reason: 'The solvent peak is integrated', total: null })
  })

  it('refuses an accept without every score, and writes nothing', async () => {
    const [submission] = await freshUnit()
    const scores = fullMarks()
    delete scores[scope.course.rubric[0]!.key]
    await expect(saveSubmissionReview(testDb(), actor, scope, submission!, { decision: 'accept', comment: '', scores }, context))
      .rejects.toMatchObject({ statusCode: 400 })
    expect(await statusOf(submission!.id)).toBe('pending')
    expect(await reviewsOf(submission!.id)).toEqual([])
    expect(await auditRowsOf('submission', submission!.id)).toEqual([])
  })

  it('refuses to accept a run with a blocking flag unless the comment says why', async () => {
    const [submission] = await freshUnit(1, { attention: 2 })
    await expect(saveSubmissionReview(testDb(), actor, scope, submission!, { decision: 'accept', comment: '', scores: fullMarks() }, context))
      .rejects.toMatchObject({ statusCode: 400, data: { field: 'comment' } })
    expect(await reviewsOf(submission!.id)).toEqual([])
  })

  it('refuses an older version with 409 and leaves it pending', async () => {
    const [older, newer] = await freshUnit(2)
    await expect(saveSubmissionReview(testDb(), actor, scope, older!, { decision: 'accept', comment: '', scores: fullMarks() }, context))
      .rejects.toMatchObject({ statusCode: 409 })
    expect(await statusOf(older!.id)).toBe('pending')
    expect(await statusOf(newer!.id)).toBe('pending')
    expect(await auditRowsOf('submission', older!.id)).toEqual([])
  })
})

describe('setSubmissionExclusion', () => {
  it('excludes with the reason, counts the run again, and audits both', async () => {
    const [submission] = await freshUnit()
    const out = await setSubmissionExclusion(testDb(), actor, submission!, 'Wrong column was injected')
    expect(out.excluded).toMatchObject({ by: actor.name, reason: 'Wrong column was injected' })
    let row = await testDb().selectFrom('submissions').select(['excludedAt', 'excludedBy', 'exclusionReason'])
      .where('id', '=', submission!.id).executeTakeFirstOrThrow()
    expect(row).toMatchObject({ excludedBy: actor.id, exclusionReason: 'Wrong column was injected' })
    expect(row.excludedAt).not.toBeNull()

    expect(await setSubmissionExclusion(testDb(), actor, submission!, null)).toEqual({ id: submission!.id, excluded: null })
    row = await testDb().selectFrom('submissions').select(['excludedAt', 'excludedBy', 'exclusionReason'])
      .where('id', '=', submission!.id).executeTakeFirstOrThrow()
    expect(row).toEqual({ excludedAt: null, excludedBy: null, exclusionReason: null })
    const audit = await auditRowsOf('submission', submission!.id)
    expect(audit.map((a) => a.action)).toEqual(['submission.exclude', 'submission.include'])
    expect(audit[1]!.before).toMatchObject({ excluded: true, reason: 'Wrong column was injected' })
  })

  it('writes nothing when counting again a run that was never excluded', async () => {
    const [submission] = await freshUnit()
    await setSubmissionExclusion(testDb(), actor, submission!, null)
    expect(await auditRowsOf('submission', submission!.id)).toEqual([])
  })
})

describe('acceptCleanInBulk', () => {
  const row = (id: number, over: Partial<QueueRow> = {}): QueueRow => ({
    id, unit: { key: `unit-${id}`, label: '', members: [], station: null }, section: { id: 0, code: '' }, version: 1,
    submittedAt: '', late: false, status: 'pending', keyFactor: 4, flags: [], attention: 0, excluded: null, clean: true, toMark: false, ...over,
  })

  it('accepts only the clean rows, scoring accuracy alone and leaving the parts a person reads to mark', async () => {
    const [clean] = await freshUnit(1, { factorSecondary: 4 })
    const [flagged] = await freshUnit()
    const [taken] = await freshUnit()
    const queue = {
      expected: 4,
      rows: [
        row(clean!.id),
        row(flagged!.id, { attention: 1, flags: [{ code: 'low-area', severity: 'warning', message: 'small' }] }),
        row(taken!.id, { status: 'accepted' }),
      ],
    }
    const result = await acceptCleanInBulk(testDb(), actor, scope, queue, [clean!.id, flagged!.id, taken!.id, 999_999_999], {})
    // An exact selectivity: full accuracy points; the chromatogram and the discussion wait for a person, so no total yet.
    const accuracyOnly = Object.fromEntries(scope.course.rubric.filter((c) => c.kind === 'accuracy').map((c) => [c.key, c.maxPoints]))
    const manual = scope.course.rubric.filter((c) => c.kind === 'manual').map((c) => c.key)
    expect(manual.length).toBeGreaterThan(0)
    expect(result.accepted).toEqual([{ id: clean!.id, scores: accuracyOnly, total: null, toMark: manual }])
    expect(Object.fromEntries(result.skipped.map((s) => [s.id, s.reason]))).toEqual({
      [flagged!.id]: 'Has flags to look at: review it on its own',
      [taken!.id]: 'Already accepted',
      999999999: 'Not in your queue: not found, or not the latest version of its work unit',
    })
    expect(await statusOf(clean!.id)).toBe('accepted')
    expect(await statusOf(flagged!.id)).toBe('pending')
    const [audit] = await auditRowsOf('submission', clean!.id)
    expect(audit!.after).toMatchObject({ status: 'accepted', bulk: true, scores: accuracyOnly, total: null })
  })

  it('fills a part a person reads only with the points the reviewer gave for every chosen run', async () => {
    const [clean] = await freshUnit(1, { factorSecondary: 4 })
    const given = Object.fromEntries(scope.course.rubric.filter((c) => c.kind === 'manual').map((c) => [c.key, 1]))
    const result = await acceptCleanInBulk(testDb(), actor, scope, { expected: 4, rows: [row(clean!.id)] }, [clean!.id], given)
    expect(result.accepted[0]).toMatchObject({ toMark: [], scores: { ...given } })
    const manualMax = scope.course.rubric.filter((c) => c.kind === 'manual').reduce((sum, c) => sum + c.maxPoints, 0)
    expect(result.accepted[0]!.total).toBe(maxTotal() - manualMax + Object.keys(given).length)
  })

  it('skips a row whose unit got a newer version since the queue was read', async () => {
    const [first] = await freshUnit(1)
    await insertVersion({
      practicalId: scope.practical.id, sectionId: first!.sectionId, unitKey: first!.unitKey, submittedBy: first!.submittedBy, version: 2,
    })
    const result = await acceptCleanInBulk(testDb(), actor, scope, { expected: 4, rows: [row(first!.id)] }, [first!.id], {})
    expect(result).toEqual({ accepted: [], skipped: [{ id: first!.id, reason: 'Changed while accepting: review it on its own' }] })
    expect(await statusOf(first!.id)).toBe('pending')
  })

  it('refuses given scores outside the rubric before writing anything', async () => {
    const [clean] = await freshUnit(1, { factorSecondary: 4 })
    await expect(acceptCleanInBulk(testDb(), actor, scope, { expected: 4, rows: [row(clean!.id)] }, [clean!.id], { nonsense: 1 }))
      .rejects.toMatchObject({ statusCode: 400 })
    expect(await statusOf(clean!.id)).toBe('pending')
  })
})
