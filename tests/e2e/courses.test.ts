import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client } from '../support/http'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'

afterAll(closeTestDb)

let instructor: Client
beforeAll(async () => { instructor = await signedIn(DEMO.instructor) })

async function demoCourse() {
  return testDb().selectFrom('courses').selectAll().where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
}
async function demoSection(code: string) {
  const course = await demoCourse()
  return testDb().selectFrom('sections').selectAll().where('courseId', '=', course.id).where('code', '=', code).executeTakeFirstOrThrow()
}

const sectionBody = (over: Record<string, unknown> = {}) => ({
  code: 'X1', weekday: 5, startTime: '09:00', endTime: '11:50', room: 'Annex 3', hoodStations: 10, studentsPerStation: 2,
  firstDate: '2026-09-04', lastDate: '2026-12-11', skippedDates: ['2026-11-27'], taIds: [], ...over,
})

describe('GET /api/courses (public contract)', () => {
  it('gives each role the courses it may see, as { id, code, title, term }', async () => {
    const mine = await instructor.get('/api/courses')
    expect(mine.status).toBe(200)
    const demo = mine.body.find((c) => c.code === 'CHEM 2240')
    expect(Object.keys(demo!).sort()).toEqual(['code', 'id', 'term', 'title'])
    for (const email of [DEMO.ta1, DEMO.coordinator, DEMO.student(20)]) {
      const reply = await (await signedIn(email)).get('/api/courses')
      expect(reply.body.map((c) => c.code), email).toContain('CHEM 2240')
    }
    const stranger = await createUser('instructor')
    const none = await (await signedIn(stranger.email, stranger.password)).get('/api/courses')
    expect(none.body.some((c) => c.code === 'CHEM 2240')).toBe(false)
  })

  // PostgreSQL writes this answer's JSON (server/services/courses/course-views.ts): it must be the
  // text JSON.stringify would write, escapes and key order included, ordered by term (descending), then code.
  it('is the JSON JSON.stringify writes, titles with quotes, backslashes and non-ASCII letters included', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    await client.post('/api/courses', { code: 'CHEM 9101', title: 'Lab "B" \\ path', term: 'Fall 2026' })
    await client.post('/api/courses', { code: 'CHEM 9100', title: 'Réactions – ¼ scale 🧪', term: 'Spring 2027' })
    await client.post('/api/courses', { code: 'CHEM 9099', title: 'Plain', term: 'Fall 2026' })
    const reply = await client.get('/api/courses')
    expect(reply.headers.get('content-type')).toMatch(/^application\/json/)
    expect(reply.text).toBe(JSON.stringify(reply.body))
    expect(reply.body.map((c) => [c.code, c.title, c.term])).toEqual([
      ['CHEM 9100', 'Réactions – ¼ scale 🧪', 'Spring 2027'], ['CHEM 9099', 'Plain', 'Fall 2026'], ['CHEM 9101', 'Lab "B" \\ path', 'Fall 2026'],
    ])
    expect(Object.keys(reply.body[0]!)).toEqual(['id', 'code', 'title', 'term'])
  })

  it('another instructor gets 404 for the course, never its data', async () => {
    const stranger = await createUser('instructor')
    const client = await signedIn(stranger.email, stranger.password)
    const course = await demoCourse()
    expect((await client.get(`/api/courses/${course.id}`)).status).toBe(404)
    expect((await client.get(`/api/courses/${course.id}/sections`)).status).toBe(404)
  })
})

describe('courses and sections', () => {
  it('creates a course with default settings; a duplicate code in the term is refused', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    const created = await client.post('/api/courses', { code: 'CHEM 9001', title: 'Test Lab', term: 'Spring 2027', timezone: 'America/Chicago' })
    expect(created.status).toBe(201)
    const detail = await client.get(`/api/courses/${created.body.id}`)
    // New courses run the generalized ESD test (migration 2026_12_03_0930_outlier_test_gesd).
    expect(detail.body).toMatchObject({ outlierTest: 'gesd', releasePolicy: 'on-review', role: 'owner' })
    expect(detail.body.rubric.length).toBeGreaterThan(0)
    const again = await client.post('/api/courses', { code: 'CHEM 9001', title: 'Again', term: 'Spring 2027' })
    expect(again.status).toBe(409)
    const badZone = await client.post('/api/courses', { code: 'CHEM 9002', title: 'T', term: 'Spring 2027', timezone: 'Mars/Olympus' })
    expect(badZone.status).toBe(400)
    expect(badZone.refusal.statusMessage).toMatch(/^timezone:/)
  })

  it('a section lists its meetings without skipped dates, and validation names the field', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    const course = await client.post('/api/courses', { code: 'CHEM 9010', title: 'T', term: 'Fall 2026' })
    const bad = await client.post(`/api/courses/${course.body.id}/sections`, sectionBody({ endTime: '08:00' }))
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^endTime:/)
    const ok = await client.post(`/api/courses/${course.body.id}/sections`, sectionBody({ room: `Room ${owner.id}` }))
    expect(ok.status).toBe(201)
    const dates = ok.body.section.meetings.map((m) => m.date)
    // Fridays from 2026-09-04 to 2026-12-11 (ISO calendar): 15, minus the skipped 2026-11-27.
    expect(dates).toHaveLength(14)
    expect(dates).not.toContain('2026-11-27')
    const audit = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'section').where('entityId', '=', String(ok.body.section.id)).execute()
    expect(audit.map((a) => a.action)).toEqual(['section.create'])
  })

  it('keeps 09:00 local across the end of daylight saving time', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    const course = await client.post('/api/courses', { code: 'CHEM 9020', title: 'T', term: 'Fall 2026', timezone: 'America/Chicago' })
    const ok = await client.post(`/api/courses/${course.body.id}/sections`, sectionBody({ room: `DST room ${owner.id}`, firstDate: '2026-10-23', lastDate: '2026-11-06', skippedDates: [] }))
    // US DST ends 2026-11-01 (Energy Policy Act of 2005; IANA tz database): CDT UTC−5 → CST UTC−6.
    expect(ok.body.section.meetings.map((m) => m.start)).toEqual(['2026-10-23T14:00:00.000Z', '2026-10-30T14:00:00.000Z', '2026-11-06T15:00:00.000Z'])
  })

  it('refuses a TA double-booked across courses with 409 until the instructor confirms', async () => {
    // A fresh TA and two fresh courses, so the demo world keeps its own timetable.
    const ta = await createUser('ta', { name: 'Odile Fairweather' })
    const first = await signedIn((await createUser('instructor')).email, 'a-long-test-password-42')
    const second = await signedIn((await createUser('instructor')).email, 'a-long-test-password-42')
    const courseA = await first.post('/api/courses', { code: 'CHEM 9031', title: 'Course A', term: 'Fall 2026' })
    const courseB = await second.post('/api/courses', { code: 'CHEM 9032', title: 'Course B', term: 'Fall 2026' })
    const a = await first.post(`/api/courses/${courseA.body.id}/sections`, sectionBody({ code: 'A1', weekday: 1, startTime: '08:30', endTime: '11:20', room: `Room A ${ta.id}`, taIds: [ta.id] }))
    expect(a.status).toBe(201)
    const clash = sectionBody({ code: 'B1', weekday: 1, startTime: '10:00', endTime: '12:00', room: `Room B ${ta.id}`, taIds: [ta.id] })
    const refused = await second.post(`/api/courses/${courseB.body.id}/sections`, clash)
    expect(refused.status).toBe(409)
    expect(refused.refusal.data?.conflicts?.[0]).toMatchObject({ kind: 'ta-overlap', sectionIds: expect.arrayContaining([a.body.section.id]) })
    expect(refused.refusal.data?.conflicts?.[0]?.message).toContain('Odile Fairweather')
    const count = await testDb().selectFrom('sections').select('id').where('courseId', '=', courseB.body.id).execute()
    expect(count).toHaveLength(0)
    const confirmed = await second.post(`/api/courses/${courseB.body.id}/sections`, { ...clash, confirmConflicts: true })
    expect(confirmed.status).toBe(201)
    expect(confirmed.body.conflicts).toHaveLength(1)
  })

  it('refuses a double-booked room, and a section shrunk below its enrolment', async () => {
    const w1 = await demoSection('W1') // Bellweather Hall 214, Wednesdays 13:00–15:50
    const course = await demoCourse()
    const room = await instructor.post(`/api/courses/${course.id}/sections`, sectionBody({ code: 'W2', weekday: 3, startTime: '14:00', endTime: '16:00', room: 'bellweather hall 214', firstDate: w1.firstDate, lastDate: w1.lastDate, skippedDates: [] }))
    expect(room.status).toBe(409)
    expect(room.refusal.data?.conflicts?.map((c) => c.kind)).toEqual(['room-overlap'])

    const t1 = await demoSection('T1') // 16 students
    const view = (await instructor.get(`/api/sections/${t1.id}`)).body
    const shrink = await instructor.request(`/api/sections/${t1.id}`, { method: 'PATCH', json: { ...view, hoodStations: 6, taIds: view.tas.map((t) => t.id) } })
    expect(shrink.status).toBe(409)
    expect(shrink.refusal.data?.conflicts?.[0]).toMatchObject({ kind: 'capacity' })
  })

  it('the whole-course check lists the conflicts confirmed earlier, including ones across courses', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    const course = await client.post('/api/courses', { code: 'CHEM 9050', title: 'T', term: 'Fall 2026' })
    const first = await client.post(`/api/courses/${course.body.id}/sections`, sectionBody({ code: 'A', room: `Shared ${owner.id}` }))
    expect((await client.get(`/api/courses/${course.body.id}/conflicts`)).body).toEqual([])
    await client.post(`/api/courses/${course.body.id}/sections`, { ...sectionBody({ code: 'B', room: `Shared ${owner.id}` }), confirmConflicts: true })
    const reply = await client.get(`/api/courses/${course.body.id}/conflicts`)
    expect(reply.status).toBe(200)
    expect(reply.body).toEqual([expect.objectContaining({ kind: 'room-overlap', sectionIds: expect.arrayContaining([first.body.section.id]) })])
  })

  it('settings are validated and saved with an audit row', async () => {
    const owner = await createUser('instructor')
    const client = await signedIn(owner.email, owner.password)
    const course = await client.post('/api/courses', { code: 'CHEM 9040', title: 'T', term: 'Fall 2026' })
    const bad = await client.request(`/api/courses/${course.body.id}/settings`, { method: 'PUT', json: { outlierTest: 'dixon', outlierAlpha: 0.05, zscoreLimit: 3.5, accuracyTolerancePercent: 10, releasePolicy: 'manual', rubric: [] } })
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^rubric:/)
    const ok = await client.request(`/api/courses/${course.body.id}/settings`, { method: 'PUT', json: { outlierTest: 'dixon', outlierAlpha: 0.1, zscoreLimit: 3.5, accuracyTolerancePercent: 10, releasePolicy: 'manual', rubric: [{ key: 'accuracy', label: 'Accuracy', maxPoints: 10, kind: 'accuracy' }] } })
    expect(ok.status).toBe(204)
    expect((await client.get(`/api/courses/${course.body.id}`)).body).toMatchObject({ outlierTest: 'dixon', outlierAlpha: 0.1, releasePolicy: 'manual' })
    const ta = await signedIn(DEMO.ta1)
    expect((await ta.request(`/api/courses/${course.body.id}/settings`, { method: 'PUT', json: {} })).status).toBe(404)
  })
})

describe('scope of section reads', () => {
  it('a TA sees only their sections; another section is 404', async () => {
    const ta1 = await signedIn(DEMO.ta1)
    const course = await demoCourse()
    const list = await ta1.get(`/api/courses/${course.id}/sections`)
    expect(list.body.map((s) => s.code).sort()).toEqual(['M1', 'W1'])
    const t1 = await demoSection('T1')
    expect((await ta1.get(`/api/sections/${t1.id}`)).status).toBe(404)
  })

  it('a student sees only their own section, and cannot see conflicts', async () => {
    const student = await signedIn(DEMO.student(1)) // M1
    const course = await demoCourse()
    const list = await student.get(`/api/courses/${course.id}/sections`)
    expect(list.body.map((s) => s.code)).toEqual(['M1'])
    expect((await student.get(`/api/courses/${course.id}/conflicts`)).status).toBe(403)
    expect((await student.get(`/api/sections/${(await demoSection('R1')).id}`)).status).toBe(404)
  })

  it('the coordinator reads every section but cannot change one', async () => {
    const coordinator = await signedIn(DEMO.coordinator)
    const m1 = await demoSection('M1')
    expect((await coordinator.get(`/api/sections/${m1.id}`)).status).toBe(200)
    expect((await coordinator.request(`/api/sections/${m1.id}`, { method: 'PATCH', json: sectionBody() })).status).toBe(403)
  })
})

describe('student lab and schedule', () => {
  it('a student sees their station and partner, and the R1 holiday is not a meeting', async () => {
    const student = await signedIn(DEMO.student(50)) // R1, second seat of station 1 with student49
    const lab = await student.get('/api/me/lab')
    expect(lab.status).toBe(200)
    const [e] = lab.body.enrollments
    expect(e!.section.code).toBe('R1')
    expect(e!.station).toBe(1)
    expect(e!.partners).toHaveLength(1)
    const r1 = await demoSection('R1')
    expect(r1.skippedDates).toHaveLength(1)
    expect(e!.meetings.map((m) => m.date)).not.toContain(r1.skippedDates[0])
    expect((await (await signedIn(DEMO.ta1)).get('/api/me/lab')).status).toBe(403)
  })

  it('the schedule lists each role’s meetings in a date range', async () => {
    const m1 = await demoSection('M1')
    const range = `from=${m1.firstDate}&to=${m1.lastDate}`
    const all = await (await signedIn(DEMO.coordinator)).get(`/api/schedule?${range}`)
    const demo = all.body.filter((e) => e.courseCode === 'CHEM 2240')
    expect(new Set(demo.map((e) => e.sectionCode))).toEqual(new Set(['M1', 'T1', 'W1', 'R1']))
    const ta2 = await (await signedIn(DEMO.ta2)).get(`/api/schedule?${range}`)
    expect(new Set(ta2.body.map((e) => e.sectionCode))).toEqual(new Set(['T1', 'R1']))
    const bad = await (await signedIn(DEMO.ta2)).get('/api/schedule?from=2026-12-01&to=2026-11-01')
    expect(bad.status).toBe(400)
  })
})
