import type { Insertable } from 'kysely'
import type { PracticalItemsTable } from '../../server/database/schema'
import { createUser, testDb } from './db'

const DAY = 86_400_000

/** A Monday at least `days` ahead, 'YYYY-MM-DD' (past every demo meeting when far enough). */
export function mondayAfter(days: number): string {
  const start = Date.now() + days * DAY
  const weekday = new Date(start).getUTCDay() || 7
  return new Date(start + ((8 - weekday) % 7) * DAY).toISOString().slice(0, 10)
}

/**
 * A course of its own whose one section meets once, on `monday`, with `students` students in
 * pairs, and a practical of these items (none linked to the catalog unless an item says so).
 */
export async function practicalMeetingOnce(
  tag: string, monday: string, students: number, items: Array<Omit<Insertable<PracticalItemsTable>, 'practicalId' | 'position'>>,
) {
  const db = testDb()
  const owner = await createUser('instructor')
  const course = await db.insertInto('courses').values({ code: `STOCK ${tag}`, title: 'Stock check', term: 'Test', rubric: '[]', createdBy: owner.id })
    .returning('id').executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: owner.id }).execute()
  const section = await db.insertInto('sections').values({
    courseId: course.id, code: 'A', weekday: 1, startTime: '13:00', endTime: '15:50', room: `Stock room ${tag}`, hoodStations: 12,
    firstDate: monday, lastDate: monday, skippedDates: [],
  }).returning('id').executeTakeFirstOrThrow()
  for (let i = 0; i < students; i++) {
    const student = await createUser('student')
    const place = { station: Math.floor(i / 2) + 1, seat: (i % 2) + 1 }
    await db.insertInto('enrollments').values({ courseId: course.id, sectionId: section.id, userId: student.id, ...place }).execute()
  }
  const substrate = await db.selectFrom('substrates').select('id').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').select('id').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const practical = await db.insertInto('practicals')
    .values({ courseId: course.id, title: `Stock practical ${tag}`, substrateId: substrate.id, methodId: method.id, workUnit: 'pair' })
    .returning('id').executeTakeFirstOrThrow()
  await db.insertInto('practicalItems').values(items.map((item, position) => ({ ...item, practicalId: practical.id, position }))).execute()
  const dueAt = new Date(Date.parse(monday) + 7 * DAY)
  await db.insertInto('practicalSessions').values({ practicalId: practical.id, sectionId: section.id, meetingDate: monday, dueAt }).execute()
  const stored = await db.selectFrom('practicalItems').select(['id', 'name', 'reagentId'])
    .where('practicalId', '=', practical.id).orderBy('position').execute()
  return { practicalId: practical.id, courseId: course.id, items: stored, owner }
}
