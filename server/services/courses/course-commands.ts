import type { Kysely } from 'kysely'
import type { z } from 'zod'
import type { Course, Database } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import { DEFAULT_RUBRIC, type courseInputSchema, type CourseListItem, type CourseSettings } from '#shared/types/course'

// Creating a course and changing its description, settings and owners, each in one transaction
// with its audit row. Except for createCourse, the caller has checked that the actor owns the course.

type Db = Kysely<Database>
export type CourseFields = z.output<typeof courseInputSchema>

/** A new course owned by its creator, with the default rubric; 409 when its code is taken for that term. */
export async function createCourse(db: Db, actor: Actor, creatorId: number, input: CourseFields): Promise<CourseListItem> {
  return db.transaction().execute(async (trx) => {
    const clash = await trx.selectFrom('courses').select('id').where('code', '=', input.code).where('term', '=', input.term)
      .executeTakeFirst()
    if (clash) invalid([{ field: 'code', message: `${input.code} already exists for ${input.term}` }], 409)
    const row = await trx.insertInto('courses')
      .values({ ...input, rubric: JSON.stringify(DEFAULT_RUBRIC), createdBy: creatorId })
      .returning(['id', 'code', 'title', 'term']).executeTakeFirstOrThrow()
    await trx.insertInto('courseOwners').values({ courseId: row.id, userId: creatorId }).execute()
    await audit(trx, actor, { action: 'course.create', entity: 'course', entityId: row.id, after: input })
    return row
  })
}

export async function updateCourse(db: Db, actor: Actor, course: Course, input: CourseFields) {
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('courses').set({ ...input, updatedAt: new Date() }).where('id', '=', course.id).execute()
    await audit(trx, actor, {
      action: 'course.update', entity: 'course', entityId: course.id,
      before: { code: course.code, title: course.title, term: course.term, timezone: course.timezone }, after: input,
    })
  })
}

/** The outlier test, accuracy tolerance, release policy, days a return gives, and rubric. */
export async function updateCourseSettings(db: Db, actor: Actor, course: Course, input: CourseSettings) {
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('courses').set({ ...input, rubric: JSON.stringify(input.rubric), updatedAt: new Date() })
      .where('id', '=', course.id).execute()
    const { outlierTest, outlierAlpha, zscoreLimit, accuracyTolerancePercent, releasePolicy, resubmitDays, rubric } = course
    await audit(trx, actor, {
      action: 'course.settings', entity: 'course', entityId: course.id,
      before: { outlierTest, outlierAlpha, zscoreLimit, accuracyTolerancePercent, releasePolicy, resubmitDays, rubric },
      after: input,
    })
  })
}

/** Instructors may co-own a course: every owner has the same rights. 422 when no instructor has the e-mail. */
export async function addCourseOwner(db: Db, actor: Actor, courseId: number, email: string) {
  const user = await db.selectFrom('users').select(['id', 'name', 'role']).where('email', '=', email).executeTakeFirst()
  if (!user || user.role !== 'instructor') invalid([{ field: 'email', message: 'No instructor account has this e-mail' }], 422)
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('courseOwners').values({ courseId, userId: user.id }).onConflict((oc) => oc.doNothing()).execute()
    await audit(trx, actor, { action: 'course.owner.add', entity: 'course', entityId: courseId, after: { userId: user.id } })
  })
  return { id: user.id, name: user.name, email }
}
