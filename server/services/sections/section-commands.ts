import { createError } from 'h3'
import type { Kysely } from 'kysely'
import type { Database, Section } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import type { SectionInput } from './section-input'
import { candidateRow, checkTaIds, refuseUnconfirmedConflicts, sectionValues } from './section-input'
import { sectionViews } from './section-rows'

// Creating, changing and removing a section, each in one transaction with its audit row. The
// caller has checked that the actor manages the course. Saves check for conflicts across every
// course first (409 with data.conflicts unless input.confirmConflicts).

type Db = Kysely<Database>
type CourseRef = { id: number, code: string, timezone: string }

async function refuseTakenCode(db: Db, courseId: number, code: string, exceptId?: number) {
  let query = db.selectFrom('sections').select('id').where('courseId', '=', courseId).where('code', '=', code)
  if (exceptId !== undefined) query = query.where('id', '<>', exceptId)
  if (await query.executeTakeFirst()) invalid([{ field: 'code', message: `Section ${code} already exists in this course` }], 409)
}

async function saveSectionTas(db: Db, sectionId: number, taIds: number[]) {
  if (taIds.length) await db.insertInto('sectionTas').values(taIds.map((userId) => ({ sectionId, userId }))).execute()
}

/** A new section of the course with its TAs; returns its view and the conflicts the instructor confirmed. */
export async function createSection(db: Db, actor: Actor, course: CourseRef, input: SectionInput) {
  await checkTaIds(db, input.taIds)
  await refuseTakenCode(db, course.id, input.code)
  const conflicts = await refuseUnconfirmedConflicts(db, candidateRow(0, course, input, 0), input.confirmConflicts)
  const sectionId = await db.transaction().execute(async (trx) => {
    const row = await trx.insertInto('sections').values({ courseId: course.id, ...sectionValues(input) }).returning('id')
      .executeTakeFirstOrThrow()
    await saveSectionTas(trx, row.id, input.taIds)
    await audit(trx, actor, {
      action: 'section.create', entity: 'section', entityId: row.id,
      after: { ...sectionValues(input), taIds: input.taIds, confirmedConflicts: conflicts.map((c) => c.message) },
    })
    return row.id
  })
  const [view] = await sectionViews({ ids: [sectionId] }, db)
  return { section: view!, conflicts }
}

/** Replaces the section's fields and TAs; the conflict check sees its students as they are. */
export async function updateSection(db: Db, actor: Actor, course: CourseRef, sectionId: number, input: SectionInput) {
  await checkTaIds(db, input.taIds)
  await refuseTakenCode(db, course.id, input.code, sectionId)
  const [before] = await sectionViews({ ids: [sectionId] }, db)
  const conflicts = await refuseUnconfirmedConflicts(db, candidateRow(sectionId, course, input, before!.enrolled), input.confirmConflicts)
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('sections').set({ ...sectionValues(input), updatedAt: new Date() }).where('id', '=', sectionId).execute()
    await trx.deleteFrom('sectionTas').where('sectionId', '=', sectionId).execute()
    await saveSectionTas(trx, sectionId, input.taIds)
    const { meetings: _m, enrolled: _e, ...beforeFields } = before!
    await audit(trx, actor, {
      action: 'section.update', entity: 'section', entityId: sectionId,
      before: { ...beforeFields, taIds: before!.tas.map((t) => t.id) },
      after: { ...sectionValues(input), taIds: input.taIds, confirmedConflicts: conflicts.map((c) => c.message) },
    })
  })
  const [view] = await sectionViews({ ids: [sectionId] }, db)
  return { section: view!, conflicts }
}

/** History (enrolments, practicals) hangs off a section: only an empty one may go (409 otherwise). */
export async function deleteSection(db: Db, actor: Actor, section: Section) {
  const students = await db.selectFrom('enrollments').select('id').where('sectionId', '=', section.id).limit(1).execute()
  const sessions = await db.selectFrom('practicalSessions').select('id').where('sectionId', '=', section.id).limit(1).execute()
  if (students.length || sessions.length) {
    throw createError({ statusCode: 409, statusMessage: 'This section has students or practicals; move them first' })
  }
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('sections').where('id', '=', section.id).execute()
    await audit(trx, actor, { action: 'section.delete', entity: 'section', entityId: section.id, before: section })
  })
}
