import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { randomUUID } from 'node:crypto'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { auditRowsOf, demoPracticalScope, insertVersion, newActor } from '../../support/services-fixtures'
import { saveSubmissionReview, type ReviewerScope } from '../../../server/services/review'
import type { Actor } from '../../../server/utils/audit'
import { uploadDueAt } from '../../../shared/utils/resubmit'
import { APP_URL, stubNitroGlobals } from '../arrange'

afterAll(closeTestDb)
beforeAll(stubNitroGlobals)

// The return command's rule: a return sets the unit's new due time (the reviewer's, else the
// course's days from now at 23:59 on the course's wall clock), refuses a time in the past or too
// far ahead without writing anything, and queues one message per member of the unit, keyed by
// the return; the same return sent again answers the first and queues nothing more.

let scope: ReviewerScope
let actor: Actor

beforeAll(async () => {
  const demo = await demoPracticalScope()
  // A course of a known zone and number of days, so the default's wall clock can be checked.
  scope = { ...demo, role: 'owner', course: { ...demo.course, timezone: 'America/Chicago', resubmitDays: 3 } }
  actor = await newActor('ta')
})

/** A pair's unit (two students at one station) with one pending version, both members recorded. */
async function pairVersion() {
  const [a, b] = [await createUser('student'), await createUser('student')]
  const unitKey = `station:test-${randomUUID().slice(0, 8)}:1`
  const submission = await insertVersion({
    practicalId: scope.practical.id, sectionId: scope.sessionSectionIds[0]!, unitKey, submittedBy: a.id, version: 1,
  })
  await testDb().insertInto('submissionMembers').values([{ submissionId: submission.id, userId: a.id }, { submissionId: submission.id, userId: b.id }])
    .execute()
  return { submission, members: [a, b] }
}

const reviewsOf = (id: number) => testDb().selectFrom('reviews').selectAll().where('submissionId', '=', id).execute()
const mailOf = (reviewId: number) => testDb().selectFrom('mailMessages').select(['dedupeKey', 'toAddresses', 'subject', 'textBody', 'kind'])
  .where('dedupeKey', 'like', `return:${reviewId}:%`).orderBy('dedupeKey').execute()

describe('saveSubmissionReview: a return', () => {
  // 15:00 UTC on Tue 6 Oct 2026 is 10:00 in Chicago (CDT, UTC-5): three days later at 23:59 is
  // Fri 9 Oct 23:59 CDT = Sat 10 Oct 04:59 UTC.
  const now = new Date('2026-10-06T15:00:00Z')

  it('defaults the due time to the course days at 23:59 in its zone, and mails each member once', async () => {
    const { submission, members } = await pairVersion()
    const input = { decision: 'return' as const, reason: 'The solvent peak is integrated as a product', comment: '', scores: {} }
    const saved = await saveSubmissionReview(testDb(), actor, scope, submission, input, { appUrl: APP_URL, now })
    expect(saved).toMatchObject({ status: 'returned', resubmitDueAt: '2026-10-10T04:59:00.000Z' })
    const [review] = await reviewsOf(submission.id)
    expect(review!.resubmitDueAt!.toISOString()).toBe('2026-10-10T04:59:00.000Z')
    const mail = await mailOf(saved.reviewId)
    expect(mail.map((m) => m.dedupeKey)).toEqual(members.map((m) => `return:${saved.reviewId}:${m.id}`).sort())
    for (const m of mail) {
      expect(m.kind).toBe('submission-return')
      expect(m.textBody).toContain('The solvent peak is integrated as a product')
      expect(m.textBody).toContain('Fri 9 Oct 2026, 23:59 (America/Chicago)')
      expect(m.textBody).toContain(`${APP_URL}/practicals/${scope.practical.id}/results`)
    }
    expect(mail.flatMap((m) => m.toAddresses).sort()).toEqual(members.map((m) => m.email).sort())
    const [audit] = await auditRowsOf('submission', submission.id)
    expect(audit!.after).toMatchObject({ status: 'returned', resubmitDueAt: '2026-10-10T04:59:00.000Z', reviewId: saved.reviewId })

    // The same return again (a retried request): the first review answers, nothing more is written or queued.
    const again = await saveSubmissionReview(testDb(), actor, scope, submission, input, { appUrl: APP_URL, now })
    expect(again.reviewId).toBe(saved.reviewId)
    expect(await reviewsOf(submission.id)).toHaveLength(1)
    expect(await auditRowsOf('submission', submission.id)).toHaveLength(1)
    expect(await testDb().selectFrom('mailMessages').select('id').where('dedupeKey', 'like', `return:%:${members[0]!.id}`).execute())
      .toHaveLength(1)
  })

  it('keeps the time the reviewer sets; a corrected reason is a new return with its own message', async () => {
    const { submission, members } = await pairVersion()
    const due = '2026-10-12T17:00:00.000Z'
    const first = await saveSubmissionReview(testDb(), actor, scope, submission,
      { decision: 'return', reason: 'Peak B is missing', comment: '', scores: {}, resubmitDueAt: due }, { appUrl: APP_URL, now })
    expect(first.resubmitDueAt).toBe(due)
    const second = await saveSubmissionReview(testDb(), actor, scope, submission,
      { decision: 'return', reason: 'Peak B is missing: integrate 6.1 to 6.4 min', comment: '', scores: {}, resubmitDueAt: due },
      { appUrl: APP_URL, now })
    expect(second.reviewId).not.toBe(first.reviewId)
    expect(await mailOf(second.reviewId)).toHaveLength(members.length)
  })

  it('refuses a due time in the past or more than 60 days ahead, and writes and queues nothing', async () => {
    const { submission } = await pairVersion()
    for (const resubmitDueAt of ['2026-10-06T14:00:00.000Z', '2026-12-31T12:00:00.000Z']) {
      await expect(saveSubmissionReview(testDb(), actor, scope, submission,
        { decision: 'return', reason: 'Redo the integration', comment: '', scores: {}, resubmitDueAt }, { appUrl: APP_URL, now }))
        .rejects.toMatchObject({ statusCode: 400, data: { field: 'resubmitDueAt' } })
    }
    expect(await reviewsOf(submission.id)).toEqual([])
    expect(await auditRowsOf('submission', submission.id)).toEqual([])
    expect((await testDb().selectFrom('submissions').select('status').where('id', '=', submission.id).executeTakeFirstOrThrow()).status)
      .toBe('pending')
  })

  it('an accept sets no due time and mails nobody', async () => {
    const { submission } = await pairVersion()
    const scores = Object.fromEntries(scope.course.rubric.map((c) => [c.key, c.maxPoints]))
    const saved = await saveSubmissionReview(testDb(), actor, scope, submission, { decision: 'accept', comment: '', scores },
      { appUrl: APP_URL, now })
    expect(saved.resubmitDueAt).toBeNull()
    expect(await mailOf(saved.reviewId)).toEqual([])
  })
})

describe('uploadDueAt: what a new upload is judged against', () => {
  const section = new Date('2026-10-07T04:59:00Z')
  it('the section due time without a return, or after a later accept', () => {
    expect(uploadDueAt(section, null)).toBe(section)
    expect(uploadDueAt(section, { decision: 'accept', resubmitDueAt: null })).toBe(section)
  })
  it('a return moves it later, never earlier', () => {
    const later = new Date('2026-10-10T04:59:00Z')
    const earlier = new Date('2026-10-06T04:59:00Z')
    expect(uploadDueAt(section, { decision: 'return', resubmitDueAt: later })).toBe(later)
    expect(uploadDueAt(section, { decision: 'return', resubmitDueAt: earlier })).toBe(section)
    expect(uploadDueAt(null, { decision: 'return', resubmitDueAt: later })).toBe(later)
    expect(uploadDueAt(section, { decision: 'return', resubmitDueAt: null })).toBe(section)
  })
})
