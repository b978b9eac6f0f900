import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client } from '../support/http'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb, testDb, TEST_PASSWORD } from '../support/db'
import { makeCourse } from '../support/fixtures'

// Values that pass a type check but make no sense for a teaching lab: dates a thousand years
// out, a "term" of eighty centuries, ten thousand ids. Each is a 400 that names its field once.
// The bounds (shared/types/fields.ts): dates 2000-01-01 to 2100-12-31, a section's meetings
// within 366 days, lists capped (200 sections), ids within PostgreSQL's integer.

let owner: Client
let coordinator: Client
let courseId: number
let sectionId: number
let practicalId: number

const section = (over: Record<string, unknown> = {}) => ({
  code: 'B1', weekday: 3, startTime: '13:00', endTime: '16:00', room: 'Bounds room', hoodStations: 12,
  firstDate: '2027-01-13', lastDate: '2027-04-28', skippedDates: [], ...over,
})

beforeAll(async () => {
  const course = await makeCourse({ sections: 1 })
  owner = await signedIn(course.owner.email, TEST_PASSWORD)
  coordinator = await signedIn(DEMO.coordinator)
  courseId = course.course.id
  sectionId = course.sections[0]!.id
  practicalId = course.practicalId
})
afterAll(closeTestDb)

const sectionCount = async () => (await testDb().selectFrom('sections').select('id').where('courseId', '=', courseId).execute()).length

describe('dates', () => {
  it('a section from 1000-01-01 to 9999-12-31, a term over a year or a skipped date outside it is refused', async () => {
    const before = await sectionCount()
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ firstDate: '1000-01-01' }, 'firstDate: Use a date from 2000-01-01 to 2100-12-31'],
      [{ lastDate: '9999-12-31' }, 'lastDate: Use a date from 2000-01-01 to 2100-12-31'],
      [{ firstDate: '2027-02-31' }, 'firstDate: Not a calendar date'],
      [{ firstDate: '13/01/2027' }, 'firstDate: Use YYYY-MM-DD'],
      [{ lastDate: '2027-01-12' }, 'lastDate: On or after the first date'],
      [{ lastDate: '2028-01-20' }, 'lastDate: At most 366 days after the first date'],
      [{ skippedDates: ['2026-12-30'] }, 'skippedDates.0: Between the first and the last date'],
      [{ skippedDates: Array.from({ length: 61 }, () => '2027-02-03') }, 'skippedDates: At most 60 skipped dates'],
    ]
    for (const [over, message] of cases) {
      const reply = await owner.post(`/api/courses/${courseId}/sections`, section(over))
      expect([reply.status, reply.refusal.statusMessage], JSON.stringify(over).slice(0, 80)).toEqual([400, message])
    }
    expect(await sectionCount()).toBe(before)
    const edit = await owner.request(`/api/sections/${sectionId}`, { method: 'PATCH', json: section({ code: 'S1', lastDate: '9999-12-31' }) })
    expect([edit.status, edit.refusal.statusMessage]).toEqual([400, 'lastDate: Use a date from 2000-01-01 to 2100-12-31'])
    // A year of meetings is still a term.
    expect((await owner.post(`/api/courses/${courseId}/sections`, section({ firstDate: '2027-01-13', lastDate: '2028-01-12' }))).status).toBe(201)
  })

  it('the schedule says once that "to" must not come before "from"', async () => {
    const reversed = await owner.get('/api/schedule?from=2027-02-01&to=2027-01-01')
    expect([reversed.status, reversed.refusal.statusMessage]).toEqual([400, 'to: Must be on or after from'])
    const long = await owner.get('/api/schedule?from=2000-01-01&to=2100-12-31')
    expect([long.status, long.refusal.statusMessage]).toEqual([400, 'to: At most 366 days after from'])
    const far = await owner.get('/api/schedule?from=0999-01-01&to=2027-01-01')
    expect([far.status, far.refusal.statusMessage]).toEqual([400, 'from: Use a date from 2000-01-01 to 2100-12-31'])
    expect((await owner.get('/api/schedule?from=2027-01-01&to=2027-01-31')).status).toBe(200)
  })

  it('the forecast and order sheets name the field once', async () => {
    const reversed = await coordinator.get('/api/stockroom/forecast?from=2027-02-01&to=2027-01-01')
    expect([reversed.status, reversed.refusal.statusMessage]).toEqual([400, 'to: Must be on or after from'])
    const format = await coordinator.get('/api/stockroom/forecast?from=1/2/2027&to=2027-01-01')
    expect([format.status, format.refusal.statusMessage]).toEqual([400, 'from: Use YYYY-MM-DD'])
    const order = await coordinator.post('/api/stockroom/orders', { from: '2027-01-01', to: '2029-01-01' })
    expect([order.status, order.refusal.statusMessage]).toEqual([400, 'to: At most 366 days after from'])
  })

  it('a due date in the year 9999 and a lot received in 1900 are refused', async () => {
    const due = await owner.request(`/api/practicals/${practicalId}/sessions`, { method: 'PUT', json: { sessions: [{ sectionId, meetingDate: '2026-10-05', dueAt: '9999-12-31T23:59:00Z' }] } })
    expect([due.status, due.refusal.statusMessage]).toEqual([400, 'sessions.0.dueAt: Use a date from 2000-01-01 to 2100-12-31'])
    const reagent = await coordinator.post('/api/stockroom/reagents', { name: `Bounds ${practicalId}`, physicalState: 'solid', containerSize: 100, unit: 'g' })
    expect(reagent.status).toBe(201)
    const lot = await coordinator.post(`/api/stockroom/reagents/${reagent.body.id}/lots`, { quantity: 10, unit: 'g', receivedOn: '1900-01-01' })
    expect([lot.status, lot.refusal.statusMessage]).toEqual([400, 'receivedOn: Use a date from 2000-01-01 to 2100-12-31'])
  })
})

describe('lists, ids and lengths', () => {
  it('10,000 section ids are "at most 200 sections"; none is "pick at least one"', async () => {
    const many = await owner.post(`/api/practicals/${practicalId}/digests`, { sectionIds: Array.from({ length: 10_000 }, (_, i) => i + 1) })
    expect([many.status, many.refusal.statusMessage]).toEqual([400, 'sectionIds: At most 200 sections'])
    const none = await owner.post(`/api/practicals/${practicalId}/digests`, { sectionIds: [] })
    expect([none.status, none.refusal.statusMessage]).toEqual([400, 'sectionIds: Pick at least one section'])
  })

  it('an id beyond PostgreSQL\'s integer in a body names its field', async () => {
    const reply = await owner.post(`/api/courses/${courseId}/practicals`, { title: 'Too far', substrateId: 2 ** 31, methodId: 1 })
    expect([reply.status, reply.refusal.statusMessage]).toEqual([400, 'substrateId: Pick a substrate'])
  })

  it('a text over its length names the limit', async () => {
    const reply = await owner.request(`/api/courses/${courseId}`, { method: 'PATCH', json: { code: 'B', title: 't'.repeat(1000), term: 'Spring 2027' } })
    expect([reply.status, reply.refusal.statusMessage]).toEqual([400, 'title: Use at most 120 characters'])
  })
})
