import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { actorFor, auditRows, instructorWithCourse, stubNitroGlobals } from '../arrange'
import { addCourseOwner, createCourse, updateCourseSettings } from '../../../server/services/courses/course-commands'
import { createSection, deleteSection } from '../../../server/services/sections/section-commands'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

describe('createCourse', () => {
  it('makes the creator its owner, and refuses the same code in the same term without writing', async () => {
    const creator = await createUser('instructor')
    const code = `C${randomUUID().slice(0, 6)}`
    const fields = { code, title: 'Organic laboratory', term: 'Fall 2027', timezone: 'America/Chicago' }
    const course = await createCourse(testDb(), actorFor(creator), creator.id, fields)
    const owners = await testDb().selectFrom('courseOwners').select('userId').where('courseId', '=', course.id).execute()
    expect(owners).toEqual([{ userId: creator.id }])
    expect(await auditRows('course.create', course.id)).toHaveLength(1)

    const other = await createUser('instructor')
    await expect(createCourse(testDb(), actorFor(other), other.id, { ...fields, title: 'Another title' }))
      .rejects.toMatchObject({ statusCode: 409, data: { issues: [{ field: 'code' }] } })
    const same = await testDb().selectFrom('courses').select('id').where('code', '=', code).execute()
    expect(same).toHaveLength(1)
  })
})

describe('updateCourseSettings and addCourseOwner', () => {
  it('stores the settings with the old ones in the audit row', async () => {
    const { course, actor } = await instructorWithCourse()
    const rubric = [{ key: 'accuracy', label: 'Accuracy', maxPoints: 10, kind: 'accuracy' as const }]
    await updateCourseSettings(testDb(), actor, course, {
      outlierTest: 'grubbs', outlierAlpha: 0.1, zscoreLimit: 3.5, accuracyTolerancePercent: 25, releasePolicy: course.releasePolicy, rubric,
    })
    const stored = await testDb().selectFrom('courses').select(['outlierTest', 'outlierAlpha', 'rubric']).where('id', '=', course.id)
      .executeTakeFirstOrThrow()
    expect(stored).toMatchObject({ outlierTest: 'grubbs', outlierAlpha: 0.1, rubric })
    const [row] = await auditRows('course.settings', course.id)
    expect((row!.before as { outlierTest: string }).outlierTest).toBe(course.outlierTest)
  })

  it('adds an instructor as co-owner and refuses a student account', async () => {
    const { course, actor } = await instructorWithCourse()
    const student = await createUser('student')
    await expect(addCourseOwner(testDb(), actor, course.id, student.email)).rejects.toMatchObject({ statusCode: 422 })
    const colleague = await createUser('instructor')
    await addCourseOwner(testDb(), actor, course.id, colleague.email)
    const owners = await testDb().selectFrom('courseOwners').select('userId').where('courseId', '=', course.id).execute()
    expect(owners.map((o) => o.userId).sort()).toEqual([actor.id, colleague.id].sort())
    expect(await auditRows('course.owner.add', course.id)).toHaveLength(1)
  })
})

describe('createSection and deleteSection', () => {
  const input = (code: string, room: string) => ({
    code, weekday: 3, startTime: '09:00', endTime: '12:00', room, hoodStations: 6, studentsPerStation: 2,
    firstDate: '2027-01-13', lastDate: '2027-03-03', skippedDates: [], taIds: [], confirmConflicts: false,
  })

  it('refuses a room double-booked across courses until confirmed, then records the confirmation', async () => {
    const first = await instructorWithCourse()
    const second = await instructorWithCourse()
    const room = `Hall ${randomUUID().slice(0, 6)}`
    await createSection(testDb(), first.actor, first.course, input('A1', room))
    await expect(createSection(testDb(), second.actor, second.course, input('B1', room)))
      .rejects.toMatchObject({ statusCode: 409, data: { conflicts: [{ kind: 'room-overlap' }] } })
    expect(await testDb().selectFrom('sections').select('id').where('courseId', '=', second.course.id).execute()).toEqual([])

    const saved = await createSection(testDb(), second.actor, second.course, { ...input('B1', room), confirmConflicts: true })
    expect(saved.conflicts.length).toBeGreaterThan(0)
    const [row] = await auditRows('section.create', saved.section.id)
    expect((row!.after as { confirmedConflicts: string[] }).confirmedConflicts).toEqual(saved.conflicts.map((c) => c.message))
  })

  it('deletes only an empty section', async () => {
    const { course, actor } = await instructorWithCourse()
    const { section } = await createSection(testDb(), actor, course, input('E1', `Lab ${randomUUID().slice(0, 6)}`))
    const row = await testDb().selectFrom('sections').selectAll().where('id', '=', section.id).executeTakeFirstOrThrow()
    const student = await createUser('student')
    await testDb().insertInto('enrollments').values({ courseId: course.id, sectionId: section.id, userId: student.id }).execute()
    await expect(deleteSection(testDb(), actor, row)).rejects.toMatchObject({ statusCode: 409 })
    await testDb().deleteFrom('enrollments').where('sectionId', '=', section.id).execute()
    await deleteSection(testDb(), actor, row)
    expect(await testDb().selectFrom('sections').select('id').where('id', '=', section.id).execute()).toEqual([])
    expect(await auditRows('section.delete', section.id)).toHaveLength(1)
  })
})
