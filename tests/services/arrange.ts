import type { Role } from '../../server/database/schema'
import { randomUUID } from 'node:crypto'
import { createError } from 'h3'
import { vi } from 'vitest'
import { DEFAULT_RUBRIC } from '../../shared/types/course'
import type { Actor } from '../../server/utils/audit'
import { createUser, testDb } from '../support/db'

// What a service test arranges: the Nitro globals the cross-cutting helpers still reach for
// (server/utils is auto-imported there; the queue is replaced by a list of the jobs it was sent), a fresh instructor with a course of their
// own, and a
// section of it. Everything gets unique codes so tests never touch the demo course.

export const APP_URL = 'http://127.0.0.1:3999'
export const queuedJobs: Array<{ queue: string, data: unknown }> = []

export function stubNitroGlobals() {
  vi.stubGlobal('createError', createError)
  vi.stubGlobal('useRuntimeConfig', () => ({ public: { appUrl: APP_URL }, mail: {}, smtp: {}, session: {} }))
  vi.stubGlobal('MAIL_QUEUE', 'mail-send')
  vi.stubGlobal('inTransaction', (db: unknown) => db)
  vi.stubGlobal('useQueue',
    async () => ({ send: async (queue: string, data: unknown) => { queuedJobs.push({ queue, data }); return null } }))
}

export const actorFor = (user: { id: number, role?: Role, name?: string }): Actor =>
  ({ id: user.id, name: user.name ?? 'Test user', role: user.role ?? 'instructor', ip: '127.0.0.1' })

export async function instructorWithCourse() {
  const owner = await createUser('instructor')
  const me = { id: owner.id, name: 'Test instructor', email: owner.email, role: 'instructor' as const }
  const course = await testDb().insertInto('courses')
    .values({ code: `T${randomUUID().slice(0, 6)}`, title: 'Service test course', term: 'Spring 2027', timezone: 'America/Chicago',
      rubric: JSON.stringify(DEFAULT_RUBRIC), createdBy: owner.id })
    .returningAll().executeTakeFirstOrThrow()
  await testDb().insertInto('courseOwners').values({ courseId: course.id, userId: owner.id }).execute()
  return { me, course, actor: actorFor(owner) }
}

/** Mondays 13:00-16:00 from 2027-01-11 to 2027-02-22, 8 hoods of 2. */
export async function sectionOf(courseId: number, code = 'L01') {
  return testDb().insertInto('sections')
    .values({ courseId, code, weekday: 1, startTime: '13:00', endTime: '16:00', room: `Chem ${randomUUID().slice(0, 4)}`,
      hoodStations: 8, studentsPerStation: 2, firstDate: '2027-01-11', lastDate: '2027-02-22', skippedDates: [] })
    .returningAll().executeTakeFirstOrThrow()
}

/** A shared (seeded) library entry by name. */
export async function sharedSubstrate(name: string) {
  return testDb().selectFrom('substrates').selectAll().where('name', '=', name).where('ownerId', 'is', null).executeTakeFirstOrThrow()
}

export async function sharedMethod(reagent: 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs') {
  return testDb().selectFrom('methods').selectAll().where('reagent', '=', reagent).where('ownerId', 'is', null)
    .orderBy('id').executeTakeFirstOrThrow()
}

export async function auditRows(action: string, entityId: number | string) {
  return testDb().selectFrom('auditLog').selectAll().where('action', '=', action).where('entityId', '=', String(entityId)).execute()
}
