import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { auditRows, instructorWithCourse, sectionOf, sharedMethod, sharedSubstrate, stubNitroGlobals } from '../arrange'
import { copyCourse, previewCourseCopy } from '../../../server/services/courses/course-copy'
import { createPractical, setPracticalSessions } from '../../../server/services/practicals/practical-commands'
import { shiftDaysBetween, shiftTimetable } from '../../../shared/utils/term-shift'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

// Checks read weekdays and wall clocks through the platform's Date and Intl (the IANA database),
// not through the code under test.
const weekdayOf = (date: string) => new Date(`${date}T12:00:00Z`).getUTCDay() // 0 = Sunday, 1 = Monday
const wallClock = (at: Date, zone: string) => new Intl.DateTimeFormat('en-CA', {
  timeZone: zone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23',
}).format(at)

describe('shiftTimetable', () => {
  const section = { id: 1, code: 'L01', weekday: 1, firstDate: '2027-01-11', lastDate: '2027-02-22', skippedDates: ['2027-02-15'] }
  // 2027-01-25 23:59 in Chicago is standard time (UTC-6): 05:59 UTC the next day.
  const session = { practicalId: 7, sectionId: 1, meetingDate: '2027-01-18', dueAt: '2027-01-26T05:59:00Z' }

  it('moves by whole weeks so a Monday section starts on the first Monday of the new term', () => {
    // The new term starts on Wednesday 25 August 2027; its first Monday is the 30th.
    const shift = shiftTimetable([section], [session], { start: '2027-08-25', end: '2027-12-10' }, 'America/Chicago')
    expect(shift.days % 7).toBe(0)
    expect(shift.sections[0]).toMatchObject({ firstDate: '2027-08-30', lastDate: '2027-10-11', shortened: false })
    expect(weekdayOf(shift.sections[0]!.firstDate)).toBe(1)
    expect(weekdayOf(shift.sections[0]!.lastDate)).toBe(1)
    expect(shift.sessions[0]!.meetingDate).toBe('2027-09-06')
    expect(weekdayOf(shift.sessions[0]!.meetingDate)).toBe(1)
  })

  it('keeps the due time on the wall clock across a daylight-saving change', () => {
    // US daylight saving time runs from the second Sunday of March to the first Sunday of
    // November (Energy Policy Act of 2005, sec. 110), so September is UTC-5 in Chicago.
    const shift = shiftTimetable([section], [session], { start: '2027-08-25', end: '2027-12-10' }, 'America/Chicago')
    const due = shift.sessions[0]!.dueAt
    expect(wallClock(due, 'America/Chicago')).toBe('2027-09-13, 23:59')
    expect(due.toISOString()).toBe('2027-09-14T04:59:00.000Z')
  })

  it('ends a section early in a shorter term and drops the sessions that no longer fit', () => {
    const late = { ...session, meetingDate: '2027-02-22', dueAt: '2027-03-02T05:59:00Z' }
    const shift = shiftTimetable([section], [session, late], { start: '2027-08-25', end: '2027-09-29' }, 'America/Chicago')
    expect(shift.sections[0]).toMatchObject({ firstDate: '2027-08-30', lastDate: '2027-09-27', shortened: true })
    expect(shift.sessions.map((s) => s.meetingDate)).toEqual(['2027-09-06'])
    expect(shift.dropped).toEqual([{ practicalId: 7, sectionId: 1, oldMeetingDate: '2027-02-22', meetingDate: '2027-10-11' }])
  })

  it('never moves a date before the new start, and moves back for an earlier term', () => {
    for (const start of ['2027-08-23', '2027-08-24', '2027-08-29']) {
      const days = shiftDaysBetween('2027-01-11', start)
      expect(days % 7).toBe(0)
      expect(days).toBeGreaterThanOrEqual(0)
    }
    expect(shiftDaysBetween('2027-01-11', '2027-08-23')).toBe(224)
    expect(shiftDaysBetween('2027-01-11', '2027-08-24')).toBe(231)
    expect(shiftDaysBetween('2027-01-11', '2026-08-24')).toBe(-140)
  })
})

describe('copyCourse', () => {
  async function courseToCopy() {
    const world = await instructorWithCourse()
    const section = await sectionOf(world.course.id)
    await testDb().updateTable('sections').set({ skippedDates: ['2027-02-15'] }).where('id', '=', section.id).execute()
    const ta = await createUser('ta')
    await testDb().insertInto('sectionTas').values({ sectionId: section.id, userId: ta.id }).execute()
    const student = await createUser('student')
    await testDb().insertInto('enrollments').values({ courseId: world.course.id, sectionId: section.id, userId: student.id, station: 1 })
      .execute()
    const practicalId = await createPractical(testDb(), world.actor, world.me, world.course.id, {
      title: 'Chlorination of butane', substrateId: (await sharedSubstrate('butane')).id,
      methodId: (await sharedMethod('cl2-light')).id, workUnit: 'pair', notes: 'Bring goggles',
    })
    await setPracticalSessions(testDb(), world.actor, practicalId, world.course, [{ sectionId: section.id, meetingDate: '2027-01-18' }])
    await testDb().updateTable('courses').set({ outlierTest: 'dixon', accuracyTolerancePercent: 30 }).where('id', '=', world.course.id)
      .execute()
    const course = await testDb().selectFrom('courses').selectAll().where('id', '=', world.course.id).executeTakeFirstOrThrow()
    return { ...world, course, section, ta, practicalId }
  }
  const input = { term: 'Fall 2027', start: '2027-08-25', end: '2027-12-10', keepTas: false }
  const coursesNamed = (code: string) => testDb().selectFrom('courses').select('id').where('code', '=', code).execute()

  it('previews without writing anything', async () => {
    const { course } = await courseToCopy()
    const audits = await testDb().selectFrom('auditLog').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    const preview = await previewCourseCopy(testDb(), course, input)
    expect(preview.sections[0]).toMatchObject({ code: 'L01', weekday: 1, firstDate: '2027-08-30', lastDate: '2027-10-11', meetings: 7, tas: [] })
    expect(preview.practicals[0]!.sessions[0]).toMatchObject({ section: 'L01', oldMeetingDate: '2027-01-18', meetingDate: '2027-09-06' })
    expect(preview.notCopied.map((n) => [n.noun, n.count])).toEqual(expect.arrayContaining([['enrolment', 1], ['skipped date', 1],
      ['TA assignment', 1]]))
    expect(await coursesNamed(course.code)).toHaveLength(1)
    const after = await testDb().selectFrom('auditLog').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    expect(after.n).toBe(audits.n)
  })

  it('writes settings, sections and practicals in the new term with no students, and audits the copy', async () => {
    const { course, actor, practicalId } = await courseToCopy()
    const { id } = await copyCourse(testDb(), actor, course, input)
    const copy = await testDb().selectFrom('courses').selectAll().where('id', '=', id).executeTakeFirstOrThrow()
    expect(copy).toMatchObject({ code: course.code, title: course.title, term: 'Fall 2027', timezone: 'America/Chicago',
      outlierTest: 'dixon', accuracyTolerancePercent: 30, rubric: course.rubric })
    const [section] = await testDb().selectFrom('sections').selectAll().where('courseId', '=', id).execute()
    expect(section).toMatchObject({ code: 'L01', weekday: 1, startTime: '13:00:00', firstDate: '2027-08-30', lastDate: '2027-10-11',
      skippedDates: [], hoodStations: 8 })
    expect(await testDb().selectFrom('sectionTas').select('userId').where('sectionId', '=', section!.id).execute()).toEqual([])
    expect(await testDb().selectFrom('enrollments').select('id').where('courseId', '=', id).execute()).toEqual([])
    const [practical] = await testDb().selectFrom('practicals').selectAll().where('courseId', '=', id).execute()
    expect(practical).toMatchObject({ title: 'Chlorination of butane', notes: 'Bring goggles', workUnit: 'pair', resultsReleasedAt: null })
    const itemsOf = (pid: number) => testDb().selectFrom('practicalItems').select(['position', 'role', 'name', 'basis', 'amount'])
      .where('practicalId', '=', pid).orderBy('position').execute()
    expect(await itemsOf(practical!.id)).toEqual(await itemsOf(practicalId))
    const [session] = await testDb().selectFrom('practicalSessions').selectAll().where('practicalId', '=', practical!.id).execute()
    expect(session).toMatchObject({ sectionId: section!.id, meetingDate: '2027-09-06' })
    expect(wallClock(session!.dueAt, 'America/Chicago')).toBe('2027-09-13, 23:59')
    const [audit] = await auditRows('course.copy', id)
    expect(audit!.before).toMatchObject({ courseId: course.id })
    expect(audit!.after).toMatchObject({ sections: 1, practicals: 1, sessions: 1, taAssignments: 0 })
  })

  it('keeps TAs when asked, and refuses a term the code already has without writing', async () => {
    const { course, actor, ta } = await courseToCopy()
    const { id } = await copyCourse(testDb(), actor, course, { ...input, keepTas: true })
    const tas = await testDb().selectFrom('sectionTas').innerJoin('sections', 'sections.id', 'sectionTas.sectionId')
      .select('sectionTas.userId').where('sections.courseId', '=', id).execute()
    expect(tas).toEqual([{ userId: ta.id }])
    await expect(copyCourse(testDb(), actor, course, input)).rejects.toMatchObject({ statusCode: 409, data: { issues: [{ field: 'term' }] } })
    await expect(copyCourse(testDb(), actor, course, { ...input, term: 'Winter 2027', start: '2027-08-25', end: '2027-08-27' }))
      .rejects.toMatchObject({ statusCode: 400, data: { issues: [{ field: 'end' }] } })
    expect(await coursesNamed(course.code)).toHaveLength(2)
  })
})
