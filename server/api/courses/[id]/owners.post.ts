import { idParamsSchema } from '#shared/types/fields'
import { coOwnerSchema } from '#shared/types/course'

// Instructors may co-own a course: every owner has the same rights.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireCourseAccess(event, id, 'manage')
  const { email } = await readBodyAs(event, coOwnerSchema)
  const user = await useDb().selectFrom('users').select(['id', 'name', 'role']).where('email', '=', email).executeTakeFirst()
  if (!user || user.role !== 'instructor') invalid([{ field: 'email', message: 'No instructor account has this e-mail' }], 422)
  await useDb().transaction().execute(async (trx) => {
    await trx.insertInto('courseOwners').values({ courseId: id, userId: user.id }).onConflict((oc) => oc.doNothing()).execute()
    await audit(trx, event, { action: 'course.owner.add', entity: 'course', entityId: id, after: { userId: user.id } })
  })
  setResponseStatus(event, 201)
  return { id: user.id, name: user.name, email }
})
