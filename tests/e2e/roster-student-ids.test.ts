import { afterAll, describe, expect, it } from 'vitest'
import type { Client } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { courseCounts, makeCourse, upload } from './fixtures/rosters/course'

// A course enrolled from a file without ids, then the registrar's list with its id column: the
// ids land on the enrolments already there. An id that differs from the one a student holds is
// replaced only when the instructor confirms it (ids are what marks are matched by).

afterAll(closeTestDb)

const preview = (client: Client, courseId: number, file: string) => upload(client, `/api/courses/${courseId}/roster/preview`, file)
const importFile = (client: Client, courseId: number, file: string, fields: Record<string, string> = {}) =>
  upload(client, `/api/courses/${courseId}/roster/import`, file, fields)

const idsOf = (courseId: number) => testDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
  .select(['users.email', 'enrollments.studentId']).where('enrollments.courseId', '=', courseId).where('enrollments.status', '=', 'active')
  .orderBy('users.email').execute()

const WITHOUT_IDS = [
  'Email,Name,Section',
  'ines.ashgrove@ids.example,Ines Ashgrove,A1',
  'jory.brackwater@ids.example,Jory Brackwater,A1',
  'kestrel.dunmere@ids.example,Kestrel Dunmere,B1',
].join('\n')

const withIds = (ids: [string, string, string]) => [
  'Student ID,Email,Name,Section',
  `${ids[0]},ines.ashgrove@ids.example,Ines Ashgrove,A1`,
  `${ids[1]},jory.brackwater@ids.example,Jory Brackwater,A1`,
  `${ids[2]},kestrel.dunmere@ids.example,Kestrel Dunmere,B1`,
].join('\n')

describe('re-importing a roster with its student-id column', () => {
  it('adds the ids to students already enrolled, and replaces a changed id only when confirmed', async () => {
    const { course, client } = await makeCourse()
    expect((await importFile(client, course.id, WITHOUT_IDS)).status).toBe(201)
    expect((await idsOf(course.id)).map((r) => r.studentId)).toEqual([null, null, null])

    // The same students with ids: the preview says what will happen, and the import does it.
    const file = withIds(['LS2240101', 'LS2240102', 'LS2240103'])
    const seen = await preview(client, course.id, file)
    expect(seen.status).toBe(200)
    expect(seen.body.summary).toEqual({ new: 0, enrol: 0, move: 0, unchanged: 3, errors: 0, idsAdded: 3, idsChanged: 0 })
    expect(seen.body.rows.map((r) => r.studentIdChange)).toEqual(['added', 'added', 'added'])
    const added = await importFile(client, course.id, file)
    expect(added.status).toBe(201)
    expect(added.body).toMatchObject({ summary: { unchanged: 3, idsAdded: 3, idsChanged: 0 }, idsKept: 0, skipped: [] })
    expect(await idsOf(course.id)).toEqual([
      { email: 'ines.ashgrove@ids.example', studentId: 'LS2240101' },
      { email: 'jory.brackwater@ids.example', studentId: 'LS2240102' },
      { email: 'kestrel.dunmere@ids.example', studentId: 'LS2240103' },
    ])
    const history = await client.get(`/api/courses/${course.id}/roster/imports`)
    expect(history.body[0]!.summary).toMatchObject({ idsAdded: 3 })

    // The same file again changes nothing.
    const same = await preview(client, course.id, file)
    expect(same.body.summary).toMatchObject({ unchanged: 3, idsAdded: 0, idsChanged: 0 })

    // The registrar corrected one id: shown as a change, with the id held now, never written unasked.
    const corrected = withIds(['LS2240101', 'LS2240199', 'LS2240103'])
    const change = await preview(client, course.id, corrected)
    expect(change.body.summary).toMatchObject({ idsAdded: 0, idsChanged: 1 })
    expect(change.body.rows[1]).toMatchObject({
      email: 'jory.brackwater@ids.example', studentId: 'LS2240199', studentIdChange: 'changed', previousStudentId: 'LS2240102',
    })
    const unconfirmed = await importFile(client, course.id, corrected)
    expect(unconfirmed.status).toBe(201)
    expect(unconfirmed.body).toMatchObject({ summary: { idsChanged: 0 }, idsKept: 1 })
    expect((await idsOf(course.id))[1]!.studentId).toBe('LS2240102')

    // Confirmed for that student (the e-mail is matched however it is written): replaced.
    const confirmed = await importFile(client, course.id, corrected, { replaceStudentIds: JSON.stringify(['Jory.Brackwater@ids.example']) })
    expect(confirmed.status).toBe(201)
    expect(confirmed.body).toMatchObject({ summary: { idsChanged: 1 }, idsKept: 0 })
    expect((await idsOf(course.id)).map((r) => r.studentId)).toEqual(['LS2240101', 'LS2240199', 'LS2240103'])
    const audit = await testDb().selectFrom('auditLog').select('after').where('action', '=', 'roster.import')
      .where('entityId', '=', String(course.id)).orderBy('id', 'desc').executeTakeFirstOrThrow()
    expect(audit.after).toMatchObject({ importId: confirmed.body.importId, idsKept: 0, summary: { idsChanged: 1 } })
    expect(await courseCounts(course.id)).toEqual({ enrollments: 3, imports: 4 })
  })

  it('refuses a confirmation list that is not a JSON list of e-mails, writing nothing', async () => {
    const { course, client } = await makeCourse()
    const refused = await importFile(client, course.id, WITHOUT_IDS, { replaceStudentIds: '{"not":"a list"}' })
    expect(refused.status).toBe(400)
    expect(refused.refusal.statusMessage).toMatch(/^replaceStudentIds: /)
    expect(await courseCounts(course.id)).toEqual({ enrollments: 0, imports: 0 })
  })
})
