import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { allSent, mailTo } from '../support/services'
import { makeReviewWorld, reviewPeakTable, signInAs, uploadAs, type ReviewWorld } from '../support/review'
import type { Client } from '../support/http'

afterAll(closeTestDb)

// A returned run, end to end through the server, the mail queue and the SMTP fake: both students
// of the pair get one e-mail per return (also when the TA's request is sent twice), their page
// shows the sent-back state, and the late mark of the next upload uses the return's due time.

const HOUR = 3_600_000

describe('sending a run back', () => {
  let world: ReviewWorld
  let ta: Client
  let first: Client
  let partner: Client
  let submissionId: number
  let reviewId: number
  const reason = 'The starting material is integrated as a product: leave the 2.3 min peak out.'
  const newDue = new Date(Date.now() + 48 * HOUR).toISOString()

  beforeAll(async () => {
    world = await makeReviewWorld({ sections: 1, studentsPerSection: 2 })
    // The section's own due time has passed: an upload now is late unless a return moved it.
    await testDb().updateTable('practicalSessions').set({ dueAt: new Date(Date.now() - HOUR) })
      .where('practicalId', '=', world.practicalId).execute()
    const [a, b] = world.sections[0]!.students
    ;[ta, first, partner] = await Promise.all([signInAs(world.sections[0]!.ta), signInAs(a!), signInAs(b!)])
    const upload = await uploadAs(first, world.practicalId, reviewPeakTable(world, 11))
    expect(upload.status).toBe(201)
    submissionId = (upload.body as { id: number }).id
    expect((upload.body as { late: boolean }).late).toBe(true)
  })

  it('offers the course default in the decision panel', async () => {
    const detail = await ta.get(`/api/submissions/${submissionId}`)
    expect(detail.status).toBe(200)
    expect(detail.body.resubmit.days).toBe(3)
    // 23:59 on the course's wall clock, two to four days from now.
    const ms = Date.parse(detail.body.resubmit.defaultDueAt) - Date.now()
    expect(ms).toBeGreaterThan(2 * 24 * HOUR)
    expect(ms).toBeLessThan(4 * 24 * HOUR)
  })

  it('mails each member of the pair once, even when the return is sent twice', async () => {
    const body = { decision: 'return', reason, comment: '', resubmitDueAt: newDue }
    const [one, two] = [await ta.post(`/api/submissions/${submissionId}/review`, body), await ta.post(`/api/submissions/${submissionId}/review`, body)]
    expect(one.status).toBe(200)
    expect(two.status).toBe(200)
    reviewId = one.body.reviewId
    expect(two.body.reviewId).toBe(reviewId)
    expect(one.body.resubmitDueAt).toBe(newDue)
    await allSent(`return:${reviewId}:%`, 2)
    expect(await testDb().selectFrom('mailMessages').select('id').where('dedupeKey', 'like', `return:%`)
      .where('courseId', '=', world.courseId).execute()).toHaveLength(2)
    for (const student of world.sections[0]!.students) {
      const received = await mailTo(student.email)
      expect(received).toHaveLength(1)
      const [mail] = received
      expect(mail!.subject).toContain('was sent back')
      expect(mail!.text).toContain(reason)
      expect(mail!.text).toContain('upload a new version by')
      expect(mail!.text).toContain(`/practicals/${world.practicalId}/results`)
      expect(mail!.html).toContain(`/practicals/${world.practicalId}/results`)
    }
  })

  it('shows the sent-back state with the reason and the new due time on the partner’s page', async () => {
    const mine = await partner.get(`/api/practicals/${world.practicalId}/my-submissions`)
    expect(mine.status).toBe(200)
    expect(mine.body.sentBack).toMatchObject({ version: 1, reason, dueAt: newDue })
    expect(mine.body.uploadDueAt).toBe(newDue)
    expect(mine.body.pastDue).toBe(false)
    expect(mine.body.versions[0]?.review).toMatchObject({ decision: 'return', resubmitDueAt: newDue })
  })

  it('a resubmission after the original due time but before the new one is not late', async () => {
    const upload = await uploadAs(partner, world.practicalId, reviewPeakTable(world, 12))
    expect(upload.status).toBe(201)
    expect(upload.body).toMatchObject({ version: 2, late: false })
    const stored = await testDb().selectFrom('submissions').select('late').where('id', '=', (upload.body as { id: number }).id)
      .executeTakeFirstOrThrow()
    expect(stored.late).toBe(false)
  })

  it('one after the new due time is late', async () => {
    // Time passes: the return's due time is now behind us.
    await testDb().updateTable('reviews').set({ resubmitDueAt: new Date(Date.now() - 60_000) }).where('id', '=', reviewId).execute()
    const upload = await uploadAs(first, world.practicalId, reviewPeakTable(world, 13))
    expect(upload.status).toBe(201)
    expect(upload.body).toMatchObject({ version: 3, late: true })
  })

  it('refuses a due time in the past, naming the field, and mails nobody', async () => {
    const latest = await testDb().selectFrom('submissions').select('id').where('practicalId', '=', world.practicalId)
      .orderBy('version', 'desc').executeTakeFirstOrThrow()
    const refused = await ta.post(`/api/submissions/${latest.id}/review`,
      { decision: 'return', reason: 'Again', comment: '', resubmitDueAt: new Date(Date.now() - HOUR).toISOString() })
    expect(refused.status).toBe(400)
    expect(refused.refusal.data?.field).toBe('resubmitDueAt')
    expect(await testDb().selectFrom('reviews').select('id').where('submissionId', '=', latest.id).execute()).toEqual([])
  })
})

describe('the course setting for the days a return gives', () => {
  it('is saved from the settings, checked, and offered in the decision panel', async () => {
    const world = await makeReviewWorld({ sections: 1, studentsPerSection: 2 })
    const owner = await signInAs(world.owner)
    const course = await owner.get(`/api/courses/${world.courseId}`)
    expect(course.body.resubmitDays).toBe(3)
    const { outlierTest, outlierAlpha, zscoreLimit, accuracyTolerancePercent, releasePolicy, rubric } = course.body
    const settings = { outlierTest, outlierAlpha, zscoreLimit, accuracyTolerancePercent, releasePolicy, rubric }
    const refused = await owner.request(`/api/courses/${world.courseId}/settings`, { method: 'PUT', json: { ...settings, resubmitDays: 61 } })
    expect(refused.status).toBe(400)
    expect(refused.refusal.data?.field).toBe('resubmitDays')
    const saved = await owner.request(`/api/courses/${world.courseId}/settings`, { method: 'PUT', json: { ...settings, resubmitDays: 7 } })
    expect(saved.status).toBeLessThan(300)
    expect((await owner.get(`/api/courses/${world.courseId}`)).body.resubmitDays).toBe(7)
    // Left out, the course keeps its own.
    await owner.request(`/api/courses/${world.courseId}/settings`, { method: 'PUT', json: settings })
    expect((await owner.get(`/api/courses/${world.courseId}`)).body.resubmitDays).toBe(7)

    const upload = await uploadAs(await signInAs(world.sections[0]!.students[0]!), world.practicalId, reviewPeakTable(world, 21))
    const detail = await owner.get(`/api/submissions/${(upload.body as { id: number }).id}`)
    expect(detail.body.resubmit.days).toBe(7)
    const ms = Date.parse(detail.body.resubmit.defaultDueAt) - Date.now()
    expect(ms).toBeGreaterThan(6 * 24 * HOUR)
    expect(ms).toBeLessThan(8 * 24 * HOUR)
  })
})
