import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { eventually, mailTo } from '../support/services'
import { insertResult, makeCourse } from '../support/fixtures'

afterAll(closeTestDb)

describe('the TAs’ daily summary', () => {
  it('arrives once for a TA with new runs, counts resubmissions apart, and not for a TA who opted out', async () => {
    const world = await makeCourse({ sections: 2, studentsPerSection: 2 })
    const [s1, s2] = world.sections
    const [a, b] = s1!.students
    await insertResult(world.practicalId, s1!.id, a!.id, { secondary: 3.3 })
    await insertResult(world.practicalId, s1!.id, b!.id, { secondary: 3.1 }, { status: 'returned' })
    await insertResult(world.practicalId, s1!.id, b!.id, { secondary: 3.4 }, { status: 'pending', version: 2 })
    await insertResult(world.practicalId, s2!.id, s2!.students[0]!.id, { secondary: 3.0, tertiary: null }, { status: 'pending' })

    // The second section's TA turns the summary off on their account page.
    const ta2 = await signedIn(s2!.ta.email, s2!.ta.password)
    expect((await ta2.get('/api/account/daily-summary')).body).toEqual({ dailySummary: true })
    expect((await ta2.request('/api/account/daily-summary', { method: 'PUT', json: { dailySummary: false } })).status).toBe(200)
    expect((await ta2.get('/api/account/daily-summary')).body).toEqual({ dailySummary: false })
    expect((await ta2.request('/api/account/daily-summary', { method: 'PUT', json: { dailySummary: 'no' } })).status).toBe(400)

    // The job is scheduled daily in the queue; the demo route runs it now instead of waiting.
    const schedule = await sql<{ cron: string }>`select cron from pgboss.schedule where name = 'ta-summary'`.execute(testDb())
    expect(schedule.rows.map((r) => r.cron)).toEqual(['0 12 * * *'])
    const owner = await signedIn(world.owner.email, world.owner.password)
    const run = await owner.post('/api/demo/ta-summaries')
    expect(run.status).toBe(200)
    const date = run.body.date as string
    expect(date).toMatch(/^\d{4}-\d\d-\d\d$/)

    const [mail] = await eventually(async () => {
      const got = await mailTo(s1!.ta.email)
      return got.length > 0 && got
    })
    expect(mail!.subject).toBe('Halocline: 2 new runs and 1 resubmission to review')
    expect(mail!.text).toContain(`${world.course.code} · Fixture practical, section S1: 2 new runs and 1 resubmission`)
    expect(mail!.text).toMatch(new RegExp(`/review/practicals/${world.practicalId}\\b`))
    expect(mail!.text).toContain('/account')

    // Again the same day: nobody is mailed twice; the TA who opted out never is.
    expect((await owner.post('/api/demo/ta-summaries')).status).toBe(200)
    const keys = await testDb().selectFrom('mailMessages').select('dedupeKey')
      .where('dedupeKey', 'in', [`ta-summary:${s1!.ta.id}:${date}`, `ta-summary:${s2!.ta.id}:${date}`]).execute()
    expect(keys.map((k) => k.dedupeKey)).toEqual([`ta-summary:${s1!.ta.id}:${date}`])
    await eventually(async () => {
      const row = await testDb().selectFrom('mailMessages').select('status').where('dedupeKey', '=', `ta-summary:${s1!.ta.id}:${date}`)
        .executeTakeFirstOrThrow()
      return row.status === 'sent'
    })
    expect(await mailTo(s1!.ta.email)).toHaveLength(1)
    expect(await mailTo(s2!.ta.email)).toHaveLength(0)

    // A student may not run it.
    const student = await signedIn(a!.email, a!.password)
    expect((await student.post('/api/demo/ta-summaries')).status).toBe(403)
  })
})
