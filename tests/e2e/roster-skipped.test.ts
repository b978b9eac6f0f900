import Papa from 'papaparse'
import { afterAll, describe, expect, it } from 'vitest'
import type { Client } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { courseCounts, makeCourse, registrarRoster, upload, usersWithEmailsLike } from './fixtures/rosters/course'

afterAll(closeTestDb)
/** Files whose students are new, or already there with the same ids: no id is added or replaced. */
const NO_ID_CHANGES = { idsAdded: 0, idsChanged: 0 }

const importFile = (client: Client, courseId: number, file: string, name = 'registrar.csv') =>
  upload(client, `/api/courses/${courseId}/roster/import`, file, {}, name)

const enrolled = (courseId: number) => testDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
  .select(['users.email', 'enrollments.studentId', 'enrollments.status']).where('enrollments.courseId', '=', courseId)
  .orderBy('users.email').execute()

describe('a roster with some bad rows', () => {
  it('imports the good rows, keeps the skipped ones with row and reason, and takes them again once fixed', async () => {
    const { course, sections, client } = await makeCourse()
    const roster = registrarRoster('skip.example')

    const done = await importFile(client, course.id, roster.csv)
    expect(done.status).toBe(201)
    expect(done.body.summary).toEqual({ new: 28, enrol: 0, move: 0, unchanged: 0, errors: 4, ...NO_ID_CHANGES })
    expect(done.body.skipped.map((r) => [r.row, r.reasons])).toEqual([
      [5, ['Not an e-mail address']],
      [12, ['No section “Z9” in this course']],
      [20, ['No name']],
      [27, ['Same student ID as row 2']],
    ])
    // The 28 good students are in, each with the id the file gave them; nothing of the four skipped.
    const good = roster.students.filter((s) => !roster.badRows.includes(s.row))
    expect(await enrolled(course.id)).toEqual(good.map((s) => ({ email: s.email, studentId: s.studentId, status: 'active' }))
      .sort((a, b) => a.email.localeCompare(b.email)))
    const skippedEmails = roster.bad.map((s) => s.email)
    expect((await usersWithEmailsLike('%@skip.example')).filter((u) => skippedEmails.includes(u.email))).toEqual([])

    // The skipped rows stay with the import's record: in the history and as a CSV to fix.
    const history = await client.get(`/api/courses/${course.id}/roster/imports`)
    expect(history.body[0]).toMatchObject({ id: done.body.importId, skipped: done.body.skipped })
    const audit = await testDb().selectFrom('auditLog').select('after').where('action', '=', 'roster.import')
      .where('entityId', '=', String(course.id)).executeTakeFirstOrThrow()
    expect(audit.after).toMatchObject({ importId: done.body.importId, skippedRows: roster.badRows })
    const download = await client.get(`/courses/${course.id}/roster/imports/${done.body.importId}/skipped.csv`)
    expect(download.status).toBe(200)
    expect(download.headers.get('content-type')).toMatch(/^text\/csv/)
    const [header, ...rows] = Papa.parse<string[]>(String(download.body).replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data
    expect(header).toEqual(['Row', 'Student ID', 'Name', 'E-mail', 'Section', 'Reason'])
    expect(rows.map((r) => [r[0], r[5]])).toEqual([
      ['5', 'Not an e-mail address'], ['12', 'No section “Z9” in this course'], ['20', 'No name'], ['27', 'Same student ID as row 2'],
    ])

    // The instructor fixes the four rows in the downloaded file and imports it again: four new
    // students, nobody doubled, and the downloaded file's extra columns (Row, Reason) are ignored.
    const fixes: Record<string, { email?: string, name?: string, section?: string, studentId?: string }> = {
      5: { email: roster.bad[0]!.email },
      12: { section: roster.bad[1]!.section },
      20: { name: `${roster.bad[2]!.first} ${roster.bad[2]!.last}` },
      27: { studentId: roster.bad[3]!.studentId },
    }
    const fixed = Papa.unparse([header!, ...rows.map((r) => {
      const f = fixes[r[0]!]!
      return [r[0]!, f.studentId ?? r[1]!, f.name ?? r[2]!, f.email ?? r[3]!, f.section ?? r[4]!, r[5]!]
    })])
    const preview = await upload(client, `/api/courses/${course.id}/roster/preview`, fixed, {}, 'skipped-fixed.csv')
    expect(preview.body.mapping).toMatchObject({ studentId: 'Student ID', name: 'Name', email: 'E-mail', section: 'Section' })
    const again = await importFile(client, course.id, fixed, 'skipped-fixed.csv')
    expect(again.status).toBe(201)
    expect(again.body.summary).toEqual({ new: 4, enrol: 0, move: 0, unchanged: 0, errors: 0, ...NO_ID_CHANGES })
    expect(again.body.skipped).toEqual([])
    expect(await enrolled(course.id)).toEqual(roster.students.map((s) => ({ email: s.email, studentId: s.studentId, status: 'active' }))
      .sort((a, b) => a.email.localeCompare(b.email)))
    expect(await usersWithEmailsLike('%@skip.example')).toHaveLength(32)
    expect(await courseCounts(course.id)).toEqual({ enrollments: 32, imports: 2 })

    // The whole first file once more: everyone is already there, nobody doubled.
    const third = await importFile(client, course.id, registrarRoster('skip.example').csv)
    expect(third.body.summary).toMatchObject({ new: 0, enrol: 0, unchanged: 28 })
    expect(await courseCounts(course.id)).toEqual({ enrollments: 32, imports: 3 })

    // The section roster shows each student's id.
    const a1 = await client.get(`/api/sections/${sections.A1}/roster`)
    const first = roster.students[0]!
    expect(a1.body.students.find((s) => s.email === first.email)?.studentId).toBe(first.studentId)
  })

  it('refuses a file in which no row can be imported, writing nothing', async () => {
    const { course, client } = await makeCourse()
    const file = 'Email,Name,Section,Student ID\nnot-an-address,Nobody Here,A1,LS1\nnone.here@none.example,Nobody There,Q7,LS2\n'
    const refused = await importFile(client, course.id, file)
    expect(refused.status).toBe(422)
    expect(refused.refusal.statusMessage).toBe('No row can be imported. Row 2: Not an e-mail address')
    expect(await courseCounts(course.id)).toEqual({ enrollments: 0, imports: 0 })
  })

  it('refuses a student id held by another student of the course, and takes the same id in another course', async () => {
    const { course, client } = await makeCourse()
    expect((await importFile(client, course.id, 'Email,Name,Section,Student ID\nheld.one@held.example,Held One,A1,LS5550001\n')).status).toBe(201)
    const clash = await importFile(client, course.id,
      'Email,Name,Section,Student ID\nheld.two@held.example,Held Two,B1,LS5550001\nheld.three@held.example,Held Three,B1,LS5550003\n')
    expect(clash.status).toBe(201)
    expect(clash.body.skipped).toEqual([expect.objectContaining({ row: 2, reasons: ['Another student in this course has this student ID'] })])
    const other = await makeCourse()
    const elsewhere = await importFile(other.client, other.course.id, 'Email,Name,Section,Student ID\nheld.two@held.example,Held Two,A1,LS5550001\n')
    expect(elsewhere.status).toBe(201)
    expect(elsewhere.body.summary.new + elsewhere.body.summary.enrol).toBe(1)
  })
})
