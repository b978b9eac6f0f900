import { createHash } from 'node:crypto'
import { afterAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { courseCounts, fixture, makeCourse, upload, usersWithEmailsLike } from './fixtures/rosters/course'

afterAll(closeTestDb)
/** Files whose students are new, or already there with the same ids: no id is added or replaced. */
const NO_ID_CHANGES = { idsAdded: 0, idsChanged: 0 }

const preview = (client: Client, courseId: number, file: Buffer | string, fields: Record<string, string> = {}, name?: string) =>
  upload(client, `/api/courses/${courseId}/roster/preview`, file, fields, name)
const importFile = (client: Client, courseId: number, file: Buffer | string, fields: Record<string, string> = {}, name?: string) =>
  upload(client, `/api/courses/${courseId}/roster/import`, file, fields, name)

async function demoSectionIds() {
  const rows = await testDb().selectFrom('sections').innerJoin('courses', 'courses.id', 'sections.courseId')
    .select(['sections.id', 'sections.code', 'courses.id as courseId']).where('courses.code', '=', 'CHEM 2240').execute()
  return { courseId: rows[0]!.courseId, ...Object.fromEntries(rows.map((r) => [r.code, r.id])) } as Record<'courseId' | 'M1' | 'T1' | 'W1' | 'R1', number>
}

describe('roster import', () => {
  it('previews a clean file (BOM, CRLF, first and last name, lower-case section) and imports it in one go', async () => {
    const { course, sections, client, instructor } = await makeCourse()
    const file = fixture('clean.csv')
    const seen = await preview(client, course.id, file, {}, 'clean.csv')
    expect(seen.status).toBe(200)
    expect(seen.body.columns).toEqual(['First name', 'Last name', 'E-mail', 'Section'])
    expect(seen.body.mapping).toEqual({ email: 'E-mail', name: null, firstName: 'First name', lastName: 'Last name', section: 'Section', studentId: null })
    expect(seen.body.rows.map((r) => [r.row, r.name, r.sectionCode, r.outcome])).toEqual([
      [2, 'Marisol Quenby', 'A1', 'new'], [3, 'Teodor Vashti', 'A1', 'new'], [4, 'Wren Oakhurst', 'B1', 'new'], [6, 'Isidore Pemberly', 'B1', 'new'],
    ])
    expect(seen.body.summary).toEqual({ new: 4, enrol: 0, move: 0, unchanged: 0, errors: 0, ...NO_ID_CHANGES })
    // The preview wrote nothing.
    expect(await usersWithEmailsLike('%@clean.example')).toEqual([])

    const done = await importFile(client, course.id, file, {}, 'clean.csv')
    expect(done.status).toBe(201)
    expect(done.body.summary).toEqual({ new: 4, enrol: 0, move: 0, unchanged: 0, errors: 0, ...NO_ID_CHANGES })

    const users = await usersWithEmailsLike('%@clean.example')
    expect(users.map((u) => [u.email, u.role, u.passwordHash])).toEqual([
      ['isidore.pemberly@clean.example', 'student', null], ['marisol.quenby@clean.example', 'student', null],
      ['teodor.vashti@clean.example', 'student', null], ['wren.oakhurst@clean.example', 'student', null],
    ])
    const db = testDb()
    const enrolled = await db.selectFrom('enrollments').select(['userId', 'sectionId', 'status']).where('courseId', '=', course.id).execute()
    expect(enrolled).toHaveLength(4)
    expect(enrolled.filter((e) => e.sectionId === sections.A1)).toHaveLength(2)
    const invitations = await db.selectFrom('invitations').select(['id', 'userId']).where('userId', 'in', users.map((u) => u.id)).execute()
    expect(invitations).toHaveLength(4)
    const mails = await db.selectFrom('mailMessages').select(['dedupeKey', 'kind']).where('dedupeKey', 'in', invitations.map((i) => `invitation:${i.id}`)).execute()
    expect(mails).toHaveLength(4)
    expect(mails.every((m) => m.kind === 'invitation')).toBe(true)

    const record = await db.selectFrom('rosterImports').innerJoin('files', 'files.id', 'rosterImports.fileId')
      .select(['rosterImports.id', 'rosterImports.mapping', 'files.sha256', 'files.content', 'files.originalName'])
      .where('rosterImports.id', '=', done.body.importId).executeTakeFirstOrThrow()
    expect(record.sha256).toBe(createHash('sha256').update(file).digest('hex'))
    expect(Buffer.compare(record.content, file)).toBe(0)
    expect(record.mapping).toMatchObject({ email: 'E-mail', section: 'Section' })
    const auditRow = await db.selectFrom('auditLog').select(['actorId', 'after']).where('action', '=', 'roster.import').where('entityId', '=', String(course.id)).executeTakeFirstOrThrow()
    expect(auditRow.actorId).toBe(instructor.id)
    expect(auditRow.after).toMatchObject({ importId: done.body.importId, summary: { new: 4 } })

    const history = await client.get(`/api/courses/${course.id}/roster/imports`)
    expect(history.body).toEqual([expect.objectContaining({ id: done.body.importId, fileName: 'clean.csv', by: 'Orla Test-Instructor', summary: done.body.summary })])
  })

  it('imports the good rows of a file with bad rows and names every skipped row with its reason', async () => {
    const { course, client } = await makeCourse()
    const file = fixture('bad-rows.csv')
    const seen = await preview(client, course.id, file)
    expect(seen.status).toBe(200)
    expect(seen.body.summary).toEqual({ new: 2, enrol: 0, move: 0, unchanged: 0, errors: 4, ...NO_ID_CHANGES })

    const done = await importFile(client, course.id, file)
    expect(done.status).toBe(201)
    expect(done.body.skipped.map((r) => [r.row, r.reasons])).toEqual([
      [3, ['Not an e-mail address']],
      [4, ['Same e-mail as row 2']],
      [5, ['No name']],
      [6, ['No section “Z9” in this course']],
    ])
    expect((await usersWithEmailsLike('%@bad.example')).map((u) => u.email)).toEqual(['fine.one@bad.example', 'fine.two@bad.example'])
    expect(await courseCounts(course.id)).toEqual({ enrollments: 2, imports: 1 })
  })

  it('a re-import of the same file creates no duplicates', async () => {
    const { course, client } = await makeCourse()
    const file = 'Email,Name,Section\nrepeat.one@again.example,Repeat One,A1\nrepeat.two@again.example,Repeat Two,B1\n'
    expect((await importFile(client, course.id, file)).status).toBe(201)
    const again = await importFile(client, course.id, file)
    expect(again.status).toBe(201)
    expect(again.body.summary).toEqual({ new: 0, enrol: 0, move: 0, unchanged: 2, errors: 0, ...NO_ID_CHANGES })
    const users = await usersWithEmailsLike('%@again.example')
    expect(users).toHaveLength(2)
    expect(await courseCounts(course.id)).toEqual({ enrollments: 2, imports: 2 })
    const invitations = await testDb().selectFrom('invitations').select('id').where('userId', 'in', users.map((u) => u.id)).execute()
    expect(invitations).toHaveLength(2)
  })

  it('keeps a formula-looking cell as plain text (tab-separated file)', async () => {
    const { course, sections, client } = await makeCourse()
    const done = await importFile(client, course.id, fixture('formula.tsv'), {}, 'formula.tsv')
    expect(done.status).toBe(201)
    const [formula, plain] = await usersWithEmailsLike('%@formula.example')
    expect(formula!.name).toBe('=HYPERLINK("http://x.example","y")')
    expect(plain!.name).toBe('+Plain Cell')
    const roster = await client.get(`/api/sections/${sections.A1}/roster`)
    expect(roster.body.students.map((s) => s.name)).toContain('=HYPERLINK("http://x.example","y")')
  })

  it('answers 409 when a section would pass its hood capacity, and imports once that is confirmed', async () => {
    const { course, sections, client } = await makeCourse([{ code: 'A1', hoodStations: 1, studentsPerStation: 2 }, { code: 'B1' }])
    const file = 'Email,Name,Section\ncap.one@cap.example,Cap One,A1\ncap.two@cap.example,Cap Two,A1\ncap.three@cap.example,Cap Three,A1\n'
    const seen = await preview(client, course.id, file)
    expect(seen.body.conflicts).toEqual([{ kind: 'capacity', sectionIds: [sections.A1], message: 'A1 has 3 students but 1 hood stations × 2 = 2 places.' }])

    const refused = await importFile(client, course.id, file)
    expect(refused.status).toBe(409)
    expect(refused.refusal.data?.conflicts).toHaveLength(1)
    expect(await courseCounts(course.id)).toEqual({ enrollments: 0, imports: 0 })

    const accepted = await importFile(client, course.id, file, { confirmConflicts: 'true' })
    expect(accepted.status).toBe(201)
    expect(await courseCounts(course.id)).toEqual({ enrollments: 3, imports: 1 })
  })

  it('suggests nothing for unknown headers, takes the mapping the instructor chose, and moves a student between sections', async () => {
    const { course, sections, client } = await makeCourse()
    const file = fixture('unusual-headers.csv')
    const first = await preview(client, course.id, file)
    expect(first.status).toBe(200)
    expect(first.body.mappingIssues.map((i) => i.field)).toEqual(['mapping.email', 'mapping.name', 'mapping.section'])
    expect((await importFile(client, course.id, file)).status).toBe(422)

    const mapping = JSON.stringify({ email: 'Preferred contact', name: 'Person', section: 'Lab slot' })
    const mapped = await preview(client, course.id, file, { mapping })
    expect(mapped.body.mappingIssues).toEqual([])
    expect(mapped.body.summary.new).toBe(2)
    expect((await importFile(client, course.id, file, { mapping })).status).toBe(201)

    // Kasimir moves from A1 to B1: the move is named in the preview and his station is cleared.
    const kasimir = await testDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
      .select('enrollments.id').where('users.email', '=', 'kasimir.dray@headers.example').executeTakeFirstOrThrow()
    await testDb().updateTable('enrollments').set({ station: 4, seat: 1 }).where('id', '=', kasimir.id).execute()
    const moving = 'Email,Name,Section\nkasimir.dray@headers.example,Kasimir Dray,B1\n'
    const moved = await preview(client, course.id, moving)
    expect(moved.body.rows[0]).toMatchObject({ outcome: 'move', fromSectionCode: 'A1', sectionCode: 'B1' })
    expect((await importFile(client, course.id, moving)).status).toBe(201)
    const after = await testDb().selectFrom('enrollments').select(['sectionId', 'station', 'status']).where('id', '=', kasimir.id).executeTakeFirstOrThrow()
    expect(after).toEqual({ sectionId: sections.B1, station: null, status: 'active' })
  })

  it('refuses a binary file and an empty one with a sentence', async () => {
    const { course, client } = await makeCourse()
    const binary = await preview(client, course.id, Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00]))
    expect(binary.status).toBe(415)
    const headerOnly = await preview(client, course.id, 'Email,Name,Section\n')
    expect(headerOnly.status).toBe(422)
    expect(headerOnly.refusal.statusMessage).toBe('file: The file has a header but no students')
  })
})

describe('roster scope', () => {
  it('a TA reads their own section’s roster, but not another section’s', async () => {
    const demo = await demoSectionIds()
    const ta1 = await signedIn(DEMO.ta1)
    const own = await ta1.get(`/api/sections/${demo.M1}/roster`)
    expect(own.status).toBe(200)
    expect(own.body.students).toHaveLength(16)
    const first = own.body.students.find((s) => s.email === DEMO.student(1))
    // Seeded pairs: students 01 and 02 share station 1.
    expect(first).toMatchObject({ station: 1, seat: 1, status: 'active', invitation: { state: 'accepted' } })
    expect(first!.partners).toHaveLength(1)
    const other = await ta1.get(`/api/sections/${demo.T1}/roster`)
    expect([403, 404]).toContain(other.status)
    expect(JSON.stringify(other.body)).not.toContain('@larkspur.example')
  })

  it('a coordinator and students cannot read any roster; a student cannot list other students anywhere', async () => {
    const demo = await demoSectionIds()
    const coordinator = await signedIn(DEMO.coordinator)
    const student = await signedIn(DEMO.student(1))
    for (const client of [coordinator, student]) {
      for (const path of [`/api/sections/${demo.M1}/roster`, `/api/sections/${demo.T1}/roster`, `/api/courses/${demo.courseId}/roster/imports`]) {
        const reply = await client.get(path)
        expect([403, 404], path).toContain(reply.status)
        expect(JSON.stringify(reply.body)).not.toContain(DEMO.student(2))
      }
      const previewed = await preview(client, demo.courseId, 'Email,Name,Section\nx@y.example,X,M1\n')
      expect([403, 404]).toContain(previewed.status)
    }
    expect((await new Client().get(`/api/sections/${demo.M1}/roster`)).status).toBe(401)
  })

  it('a TA cannot import, add, move, place, withdraw or auto-assign', async () => {
    const demo = await demoSectionIds()
    const ta1 = await signedIn(DEMO.ta1)
    const file = 'Email,Name,Section\nta.try@scope.example,Try,M1\n'
    expect((await importFile(ta1, demo.courseId, file)).status).toBe(403)
    expect((await ta1.post(`/api/sections/${demo.M1}/enrollments`, { email: 'ta.try@scope.example', name: 'Try' })).status).toBe(403)
    const enrollment = await testDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
      .select(['enrollments.id', 'enrollments.sectionId', 'enrollments.station']).where('users.email', '=', DEMO.student(3)).executeTakeFirstOrThrow()
    const patch = (body: unknown) => ta1.request(`/api/enrollments/${enrollment.id}`, { method: 'PATCH', json: body })
    expect((await patch({ sectionId: demo.W1 })).status).toBe(403)
    expect((await patch({ station: 1, seat: 1 })).status).toBe(403)
    expect((await ta1.post(`/api/enrollments/${enrollment.id}/withdraw`)).status).toBe(403)
    expect((await ta1.post(`/api/sections/${demo.M1}/stations/assign`)).status).toBe(403)
    const unchanged = await testDb().selectFrom('enrollments').select(['sectionId', 'station', 'status']).where('id', '=', enrollment.id).executeTakeFirstOrThrow()
    expect(unchanged).toEqual({ sectionId: enrollment.sectionId, station: enrollment.station, status: 'active' })
    expect(await usersWithEmailsLike('%@scope.example')).toEqual([])
  })

  it('an instructor who does not own the course gets 404 on its rosters', async () => {
    const demo = await demoSectionIds()
    const stranger = await createUser('instructor')
    const client = await signedIn(stranger.email, stranger.password)
    expect((await client.get(`/api/sections/${demo.M1}/roster`)).status).toBe(404)
    expect((await preview(client, demo.courseId, 'Email,Name,Section\nx@y.example,X,M1\n')).status).toBe(404)
  })
})

describe('students one by one', () => {
  it('adds an existing account without inviting it, invites a new person, and refuses staff and doubles', async () => {
    const { sections, client } = await makeCourse()
    const existing = await createUser('student', { name: 'Existing Student' })
    const reused = await client.post(`/api/sections/${sections.A1}/enrollments`, { email: existing.email, name: 'Other Name' })
    expect(reused.status).toBe(201)
    expect(reused.body).toMatchObject({ userId: existing.id, invited: false })
    const fresh = await client.post(`/api/sections/${sections.A1}/enrollments`, { email: 'Newcomer@One.example', name: 'New Comer' })
    expect(fresh.status).toBe(201)
    expect(fresh.body.invited).toBe(true)
    const [user] = await usersWithEmailsLike('newcomer@one.example')
    expect(user).toMatchObject({ role: 'student', name: 'New Comer', passwordHash: null })

    const staff = await client.post(`/api/sections/${sections.A1}/enrollments`, { email: DEMO.ta2, name: 'TA' })
    expect(staff.status).toBe(422)
    const twice = await client.post(`/api/sections/${sections.B1}/enrollments`, { email: existing.email, name: 'Existing Student' })
    expect(twice.status).toBe(409)
    expect(twice.refusal.statusMessage).toMatch(/already in section A1/)
    const bad = await client.post(`/api/sections/${sections.A1}/enrollments`, { email: 'nope', name: '' })
    expect(bad.status).toBe(400)
    expect(bad.refusal.data?.issues?.map((i) => i.field)).toEqual(['email', 'name'])
  })

  it('moves a student to another section of the same course only, and withdraws them for the record', async () => {
    const { course, sections, client, instructor } = await makeCourse()
    const other = await makeCourse([{ code: 'Z1' }], instructor)
    const added = await client.post(`/api/sections/${sections.A1}/enrollments`, { email: 'mover@one.example', name: 'Mover Person' })
    const id = added.body.enrollmentId
    await client.request(`/api/enrollments/${id}`, { method: 'PATCH', json: { station: 2, seat: 1 } })

    const elsewhere = await client.request(`/api/enrollments/${id}`, { method: 'PATCH', json: { sectionId: other.sections.Z1 } })
    expect(elsewhere.status).toBe(422)
    const moved = await client.request(`/api/enrollments/${id}`, { method: 'PATCH', json: { sectionId: sections.B1 } })
    expect(moved.status).toBe(200)
    expect(moved.body).toMatchObject({ sectionId: sections.B1, station: null, seat: null })
    const audits = await testDb().selectFrom('auditLog').select(['action', 'before', 'after']).where('entity', '=', 'enrollment').where('entityId', '=', String(id)).orderBy('id').execute()
    expect(audits.map((a) => a.action)).toEqual(['enrollment.add', 'enrollment.place', 'enrollment.move'])
    expect(audits[2]).toMatchObject({
      before: { sectionId: sections.A1, station: 2, seat: 1 },
      after: { sectionId: sections.B1, station: null },
    })

    const withdrawn = await client.post(`/api/enrollments/${id}/withdraw`)
    expect(withdrawn.status).toBe(200)
    const row = await testDb().selectFrom('enrollments').select(['status', 'withdrawnAt', 'station']).where('id', '=', id).executeTakeFirstOrThrow()
    expect(row.status).toBe('withdrawn')
    expect(row.withdrawnAt).toBeInstanceOf(Date)
    expect(row.station).toBeNull()
    expect((await client.post(`/api/enrollments/${id}/withdraw`)).status).toBe(409)
    expect((await client.request(`/api/enrollments/${id}`, { method: 'PATCH', json: { station: 1, seat: 1 } })).status).toBe(409)
    const roster = await client.get(`/api/sections/${sections.B1}/roster`)
    expect(roster.body.students).toEqual([expect.objectContaining({ id, status: 'withdrawn', station: null })])
    // Re-adding after a withdrawal makes a new enrolment; the old one stays for history.
    expect((await client.post(`/api/sections/${sections.A1}/enrollments`, { email: 'mover@one.example', name: 'Mover Person' })).status).toBe(201)
    expect((await courseCounts(course.id)).enrollments).toBe(2)
  })
})

describe('hood stations', () => {
  async function sectionWith(names: string[], stations = 3, perStation = 2) {
    const made = await makeCourse([{ code: 'S1', hoodStations: stations, studentsPerStation: perStation }])
    const tag = Math.random().toString(36).slice(2, 8)
    for (const [i, name] of names.entries()) {
      const reply = await made.client.post(`/api/sections/${made.sections.S1}/enrollments`, { email: `st${i}-${tag}@stations.example`, name, confirmConflicts: true })
      expect(reply.status).toBe(201)
    }
    return made
  }

  it('auto-assign pairs everyone in name order, and a move onto an occupied seat swaps the two', async () => {
    const { sections, client } = await sectionWith(['Esker Vale', 'Cora Lind', 'Amos Brill', 'Dana Holt', 'Bea Marsh'])
    const assigned = await client.post(`/api/sections/${sections.S1}/stations/assign`)
    expect(assigned.status).toBe(200)
    const place = (body: typeof assigned.body) => body.students.map((s) => [s.name, s.station, s.seat, s.partners.join('+')])
    expect(place(assigned.body)).toEqual([
      ['Amos Brill', 1, 1, 'Bea Marsh'], ['Bea Marsh', 1, 2, 'Amos Brill'],
      ['Cora Lind', 2, 1, 'Dana Holt'], ['Dana Holt', 2, 2, 'Cora Lind'],
      ['Esker Vale', 3, 1, ''],
    ])
    const esker = assigned.body.students.find((s) => s.name === 'Esker Vale')
    const amos = assigned.body.students.find((s) => s.name === 'Amos Brill')
    const swap = await client.request(`/api/enrollments/${esker!.id}`, { method: 'PATCH', json: { station: 1, seat: 1 } })
    expect(swap.status).toBe(200)
    expect(swap.body.swappedWith).toBe(amos!.id)
    const roster = await client.get(`/api/sections/${sections.S1}/roster`)
    expect(place(roster.body)).toEqual([
      ['Amos Brill', 3, 1, ''], ['Bea Marsh', 1, 2, 'Esker Vale'],
      ['Cora Lind', 2, 1, 'Dana Holt'], ['Dana Holt', 2, 2, 'Cora Lind'],
      ['Esker Vale', 1, 1, 'Bea Marsh'],
    ])
    // A free seat is simply taken; a seat past the section's stations is refused, naming the field.
    expect((await client.request(`/api/enrollments/${amos!.id}`, { method: 'PATCH', json: { station: 3, seat: 2 } })).body).toMatchObject({ station: 3, seat: 2 })
    const far = await client.request(`/api/enrollments/${amos!.id}`, { method: 'PATCH', json: { station: 4, seat: 1 } })
    expect(far.status).toBe(422)
    expect(far.refusal.data?.field).toBe('station')
    expect((await client.request(`/api/enrollments/${amos!.id}`, { method: 'PATCH', json: { station: 1 } })).status).toBe(400)
  })

  it('refuses to auto-assign more students than places', async () => {
    const { sections, client } = await sectionWith(['One A', 'Two B', 'Three C'], 1, 2)
    const refused = await client.post(`/api/sections/${sections.S1}/stations/assign`)
    expect(refused.status).toBe(409)
    expect(refused.refusal.statusMessage).toBe('S1 has 3 students but 2 places at its hood stations')
    const placed = await testDb().selectFrom('enrollments').select('station').where('sectionId', '=', sections.S1!).where('station', 'is not', null).execute()
    expect(placed).toEqual([])
  })

  it('adding a student past capacity needs confirmation', async () => {
    const { sections, client } = await makeCourse([{ code: 'S1', hoodStations: 1, studentsPerStation: 1 }])
    expect((await client.post(`/api/sections/${sections.S1}/enrollments`, { email: 'cap1@stations.example', name: 'Cap One' })).status).toBe(201)
    const over = await client.post(`/api/sections/${sections.S1}/enrollments`, { email: 'cap2@stations.example', name: 'Cap Two' })
    expect(over.status).toBe(409)
    expect(over.refusal.data?.conflicts?.[0]?.kind).toBe('capacity')
    expect(await usersWithEmailsLike('cap2@stations.example')).toEqual([])
    expect((await client.post(`/api/sections/${sections.S1}/enrollments`, { email: 'cap2@stations.example', name: 'Cap Two', confirmConflicts: true })).status).toBe(201)
  })
})
