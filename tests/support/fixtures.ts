import { randomUUID } from 'node:crypto'
import { testDb, createUser } from './db'

// Builds a small course of its own (so tests never disturb the demo world): one instructor,
// sections with TAs and students, and a practical on a shared library substrate and method.
export async function makeCourse(options: { substrate?: string, reagent?: 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs', sections?: number, studentsPerSection?: number } = {}) {
  const db = testDb()
  const owner = await createUser('instructor')
  const tag = randomUUID().slice(0, 6)
  const course = await db.insertInto('courses').values({ code: `T${tag}`, title: 'Fixture course', term: 'Test term', rubric: JSON.stringify([{ key: 'accuracy', label: 'Accuracy', maxPoints: 10, kind: 'accuracy' }]), createdBy: owner.id })
    .returning(['id', 'code']).executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: owner.id }).execute()
  const substrate = await db.selectFrom('substrates').select(['id']).where('name', '=', options.substrate ?? '1-chlorobutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').select(['id']).where('reagent', '=', options.reagent ?? 'so2cl2-azo').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const practical = await db.insertInto('practicals').values({ courseId: course.id, title: 'Fixture practical', substrateId: substrate.id, methodId: method.id, workUnit: 'student' })
    .returning('id').executeTakeFirstOrThrow()
  type User = Awaited<ReturnType<typeof createUser>>
  const sections: Array<{ id: number, ta: User, students: User[] }> = []
  for (let i = 0; i < (options.sections ?? 1); i++) {
    const section = await db.insertInto('sections').values({
      courseId: course.id, code: `S${i + 1}`, weekday: 1, startTime: '08:00', endTime: '09:00', room: `Fixture room ${tag} ${i}`,
      hoodStations: 30, firstDate: '2026-09-07', lastDate: '2026-12-14',
    }).returning('id').executeTakeFirstOrThrow()
    const ta = await createUser('ta')
    await db.insertInto('sectionTas').values({ sectionId: section.id, userId: ta.id }).execute()
    await db.insertInto('practicalSessions').values({ practicalId: practical.id, sectionId: section.id, meetingDate: '2026-10-05', dueAt: '2026-10-12T23:59:00Z' }).execute()
    const students = []
    for (let j = 0; j < (options.studentsPerSection ?? 0); j++) {
      const student = await createUser('student')
      await db.insertInto('enrollments').values({ courseId: course.id, sectionId: section.id, userId: student.id }).execute()
      students.push(student)
    }
    sections.push({ id: section.id, ta, students })
  }
  return { owner, course, practicalId: practical.id, sections }
}

/** A stored result with given factors, bypassing the upload (for statistics tests). */
export async function insertResult(practicalId: number, sectionId: number, userId: number, factors: { secondary?: number | null, tertiary?: number | null }, extra: { status?: 'pending' | 'accepted' | 'returned', version?: number, excluded?: string } = {}) {
  const db = testDb()
  const file = await db.insertInto('files').values({ sha256: randomUUID(), byteSize: 1, mediaType: 'text/csv', originalName: 'fixture.csv', content: Buffer.from('x'), uploadedBy: userId })
    .returning('id').executeTakeFirstOrThrow()
  const row = await db.insertInto('submissions').values({
    practicalId, sectionId, unitKey: `user:${userId}`, version: extra.version ?? 1, fileId: file.id, inputKind: 'peak-table', sha256: randomUUID(),
    result: JSON.stringify({
      molePercents: [], factors: { secondaryToPrimary: factors.secondary ?? null, tertiaryToPrimary: factors.tertiary ?? null },
    }),
    flags: '[]', factorSecondary: factors.secondary ?? null, factorTertiary: factors.tertiary ?? null, status: extra.status ?? 'accepted', submittedBy: userId,
    idempotencyKey: null, excludedAt: extra.excluded ? new Date() : null, exclusionReason: extra.excluded ?? null,
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('submissionMembers').values({ submissionId: row.id, userId }).execute()
  return row.id
}
