import { createHash, randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { APP_URL, auditRows, instructorWithCourse, queuedJobs, sectionOf, stubNitroGlobals } from '../arrange'
import { importRoster, placeEnrollment, withdrawEnrollment } from '../../../server/services/roster/roster-commands'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

function upload(text: string) {
  const bytes = Buffer.from(text, 'utf8')
  return {
    file: { name: 'roster.csv', bytes, claimedType: 'text/csv', sha256: createHash('sha256').update(bytes).digest('hex') },
    fields: {},
  }
}

async function rosterWorld() {
  const world = await instructorWithCourse()
  const section = await sectionOf(world.course.id, 'L01')
  const ctx = { course: world.course, me: world.me, appUrl: APP_URL }
  return { ...world, section, ctx }
}

const usersWith = (emails: string[]) => testDb().selectFrom('users').select(['id', 'email']).where('email', 'in', emails).execute()

describe('importRoster', () => {
  it('imports the good row with its student id and keeps the bad one, with row and reason, on the import record', async () => {
    const { actor, ctx, course } = await rosterWorld()
    const good = `ada-${randomUUID().slice(0, 8)}@test.example`
    const csv = `Name,Email,Section,Student ID\nAda Lindqvist,${good},L01,LS0000101\nBo Okafor,not-an-address,L01,LS0000102\n`
    const result = await importRoster(testDb(), actor, ctx, upload(csv), false)
    expect(result.skipped).toEqual([{
      row: 3, email: 'not-an-address', name: 'Bo Okafor', sectionCode: 'L01', studentId: 'LS0000102', reasons: ['Not an e-mail address'],
    }])
    const [user] = await usersWith([good])
    const enrolment = await testDb().selectFrom('enrollments').select('studentId').where('userId', '=', user!.id).executeTakeFirstOrThrow()
    expect(enrolment.studentId).toBe('LS0000101')
    const record = await testDb().selectFrom('rosterImports').select('skipped').where('id', '=', result.importId).executeTakeFirstOrThrow()
    expect(record.skipped).toEqual(result.skipped)
    const [row] = await auditRows('roster.import', course.id)
    expect(row!.after).toMatchObject({ skippedRows: [3], summary: { new: 1, errors: 1 } })
  })

  it('writes nothing when no row is good, naming the first bad row', async () => {
    const { actor, ctx, course } = await rosterWorld()
    const csv = 'Name,Email,Section\nBo Okafor,not-an-address,L01\nCy Marsh,,L01\n'
    const jobsBefore = queuedJobs.length
    await expect(importRoster(testDb(), actor, ctx, upload(csv), false))
      .rejects.toMatchObject({ statusCode: 422, data: { rows: [{ row: 2 }, { row: 3 }] } })
    expect(await testDb().selectFrom('rosterImports').select('id').where('courseId', '=', course.id).execute()).toEqual([])
    expect(await auditRows('roster.import', course.id)).toEqual([])
    expect(queuedJobs.length).toBe(jobsBefore)
  })

  it('creates accounts, enrolments, invitations with their mail, the file and one audit row', async () => {
    const { actor, ctx, course, section } = await rosterWorld()
    const emails = [`cy-${randomUUID().slice(0, 8)}@test.example`, `di-${randomUUID().slice(0, 8)}@test.example`]
    const csv = `Name,Email,Section\nCy Marsh,${emails[0]},L01\nDi Fenwick,${emails[1]},L01\n`
    const result = await importRoster(testDb(), actor, ctx, upload(csv), false)
    const users = await usersWith(emails)
    expect(users).toHaveLength(2)
    const enrolled = await testDb().selectFrom('enrollments').select(['userId', 'sectionId', 'status'])
      .where('courseId', '=', course.id).execute()
    expect(enrolled.map((e) => e.sectionId)).toEqual([section.id, section.id])
    const invitations = await testDb().selectFrom('invitations').select('userId').where('userId', 'in', users.map((u) => u.id)).execute()
    expect(invitations).toHaveLength(2)
    const mails = await testDb().selectFrom('mailMessages').select(['toAddresses', 'textBody']).where('courseId', '=', course.id).execute()
    expect(mails).toHaveLength(2)
    expect(mails[0]!.textBody).toContain(`${APP_URL}/invite/`)
    const [row] = await auditRows('roster.import', course.id)
    expect(row).toMatchObject({ actorId: actor.id })
    expect((row!.after as { importId: number }).importId).toBe(result.importId)
  })
})

describe('placeEnrollment and withdrawEnrollment', () => {
  it('swaps two students at a station and refuses a seat beyond the section', async () => {
    const { actor, course, section } = await rosterWorld()
    const [a, b] = [await createUser('student'), await createUser('student')]
    const [ea, eb] = await testDb().insertInto('enrollments')
      .values([{ courseId: course.id, sectionId: section.id, userId: a.id, station: 1, seat: 1 },
        { courseId: course.id, sectionId: section.id, userId: b.id, station: 2, seat: 1 }])
      .returningAll().execute()
    const after = await placeEnrollment(testDb(), actor, ea!, section, { station: 2, seat: 1, confirmConflicts: false })
    expect(after).toMatchObject({ station: 2, seat: 1, swappedWith: eb!.id })
    const bNow = await testDb().selectFrom('enrollments').select(['station', 'seat']).where('id', '=', eb!.id).executeTakeFirstOrThrow()
    expect(bNow).toEqual({ station: 1, seat: 1 })

    // 2 students per station in sectionOf: seat 3 does not exist.
    await expect(placeEnrollment(testDb(), actor, { ...ea!, station: 2, seat: 1 }, section,
      { station: 2, seat: 3, confirmConflicts: false }))
      .rejects.toMatchObject({ statusCode: 422 })
    expect(await auditRows('enrollment.place', ea!.id)).toHaveLength(1)

    const gone = await withdrawEnrollment(testDb(), actor, { ...ea!, station: 2, seat: 1 })
    expect(gone.status).toBe('withdrawn')
    await expect(withdrawEnrollment(testDb(), actor, { ...ea!, status: 'active' })).rejects.toMatchObject({ statusCode: 409 })
    expect(await auditRows('enrollment.withdraw', ea!.id)).toHaveLength(1)
  })
})
