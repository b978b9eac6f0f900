import { idParamsSchema } from '#shared/types/fields'
import { enrollmentAddSchema, type EnrollmentAdded } from '#shared/types/roster'
import { inviteToCourse, refuseOverCapacity, rosterActiveCount, rosterCapacityFor, withRosterRace } from '~~/server/services/roster'

// One student into one section: an existing account is reused, a new person is invited.
export default defineEventHandler(async (event): Promise<EnrollmentAdded> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section, course } = await requireSectionAccess(event, id, 'manage')
  const input = await readBodyAs(event, enrollmentAddSchema)

  const result = await withRosterRace(() => useDb().transaction().execute(async (trx) => {
    const user = await trx.selectFrom('users').select(['id', 'name', 'role', 'passwordHash']).where('email', '=', input.email).executeTakeFirst()
    if (user && user.role !== 'student') invalid([{ field: 'email', message: 'This e-mail belongs to a staff account, not a student' }], 422)
    const current = user && await trx.selectFrom('enrollments').innerJoin('sections', 'sections.id', 'enrollments.sectionId')
      .select(['enrollments.id', 'sections.code']).where('enrollments.userId', '=', user.id)
      .where('enrollments.courseId', '=', course.id).where('enrollments.status', '=', 'active').executeTakeFirst()
    if (current) {
      const where = current.code === section.code ? 'already in this section' : `already in section ${current.code}; move them instead`
      throw createError({ statusCode: 409, statusMessage: `This student is ${where}`, data: { enrollmentId: current.id } })
    }
    refuseOverCapacity(rosterCapacityFor(section, (await rosterActiveCount(trx, section.id)) + 1), input.confirmConflicts)

    const userId = user?.id ?? (await trx.insertInto('users').values({ email: input.email, name: input.name, role: 'student', passwordHash: null })
      .returning('id').executeTakeFirstOrThrow()).id
    const enrollment = await trx.insertInto('enrollments').values({ courseId: course.id, sectionId: section.id, userId })
      .returning('id').executeTakeFirstOrThrow()
    const invite = !user || (user.passwordHash === null)
    if (invite) await inviteToCourse(trx, { event, course, me }, { userId, email: input.email, name: user?.name ?? input.name })
    await audit(trx, event, {
      action: 'enrollment.add', entity: 'enrollment', entityId: enrollment.id,
      before: null, after: { userId, sectionId: section.id, newAccount: !user, invited: invite },
    })
    return { enrollmentId: enrollment.id, userId, invited: invite }
  }), 'This student was just added by someone else. Reload the roster.')
  setResponseStatus(event, 201)
  return result
})
