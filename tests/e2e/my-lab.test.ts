import { afterAll, describe, expect, it } from 'vitest'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'

// What a student reads about timing, on the demo: due times in the course's zone, and a warning
// when results are uploaded before their section has run the practical. The demo seeds practical
// 1 three to five weeks back and practical 2 in the coming two weeks (PRODUCT.md scenario).

afterAll(closeTestDb)

const practicalId = async (title: string) =>
  (await testDb().selectFrom('practicals').select('id').where('title', '=', title).executeTakeFirstOrThrow()).id

describe('my lab and the timing of uploads', () => {
  it('gives the course time zone with each enrolment, so due times read as on the procedure card', async () => {
    const lab = await (await signedIn(DEMO.student(4))).get('/api/me/lab')
    expect(lab.status).toBe(200)
    expect(lab.body.enrollments[0]!.course.timezone).toBe('America/Chicago')
  })

  it('says when the section has not met yet, and not after the meeting', async () => {
    const client = await signedIn(DEMO.student(4))
    const upcoming = await client.get(`/api/practicals/${await practicalId('Photochlorination of 2,3-dimethylbutane')}/my-submissions`)
    expect(upcoming.status).toBe(200)
    expect(upcoming.body.beforeMeeting).toBe(true)
    expect(upcoming.body.meetingDate! > new Date().toISOString().slice(0, 10)).toBe(true)
    const past = await client.get(`/api/practicals/${await practicalId('Chlorination of 1-chlorobutane')}/my-submissions`)
    expect(past.body.beforeMeeting).toBe(false)
  })
})

describe('pages outside the caller\'s scope', () => {
  it('a TA opening another TA\'s section page gets the not-found page, not an empty 200', async () => {
    const ta1 = await signedIn(DEMO.ta1)
    const sections = await testDb().selectFrom('sections').innerJoin('sectionTas', 'sectionTas.sectionId', 'sections.id')
      .innerJoin('users', 'users.id', 'sectionTas.userId').select(['sections.id', 'users.email']).execute()
    const other = sections.find((s) => s.email === DEMO.ta2)!.id
    const own = sections.find((s) => s.email === DEMO.ta1)!.id
    expect((await ta1.get(`/sections/${other}`)).status).toBe(404)
    expect((await ta1.get(`/sections/${own}`)).status).toBe(200)
  })
})
