import { idParamsSchema } from '#shared/types/fields'
import { inviteToCourse } from '~~/server/services/roster'
// A fresh link for a student who has not set a password; their older links stop working.
// Only an instructor who owns a course the student is (or was) enrolled in may send it.
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const db = useDb()
  const found = await db.selectFrom('enrollments')
    .innerJoin('courseOwners', 'courseOwners.courseId', 'enrollments.courseId')
    .innerJoin('courses', 'courses.id', 'enrollments.courseId')
    .innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['users.id', 'users.email', 'users.name', 'users.passwordHash', 'users.disabledAt', 'courses.id as courseId', 'courses.code', 'courses.title'])
    .where('enrollments.userId', '=', id).where('courseOwners.userId', '=', me.id).where('users.role', '=', 'student')
    .orderBy((eb) => eb.case().when('enrollments.status', '=', 'active').then(0).else(1).end())
    .orderBy('enrollments.createdAt', 'desc').executeTakeFirst()
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Student not found' })
  if (found.passwordHash) throw createError({ statusCode: 409, statusMessage: 'This student has already set a password' })
  if (found.disabledAt) throw createError({ statusCode: 409, statusMessage: 'This account is disabled' })

  const invitation = await db.transaction().execute(async (trx) => {
    const course = { id: found.courseId, code: found.code, title: found.title }
    const issued = await inviteToCourse(trx, { event, course, me }, { userId: found.id, email: found.email, name: found.name })
    await audit(trx, event, { action: 'invitation.resend', entity: 'user', entityId: found.id, after: { invitationId: issued.id, expiresAt: issued.expiresAt.toISOString() } })
    return issued
  })
  setResponseStatus(event, 201)
  return { userId: found.id, expiresAt: invitation.expiresAt.toISOString() }
})
