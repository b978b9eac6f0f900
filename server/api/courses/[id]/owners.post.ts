import { idParamsSchema } from '#shared/types/fields'
import { coOwnerSchema } from '#shared/types/course'
import { addCourseOwner } from '~~/server/services/courses'

// Instructors may co-own a course: every owner has the same rights.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireCourseAccess(event, id, 'manage')
  const { email } = await readBodyAs(event, coOwnerSchema)
  const owner = await addCourseOwner(useDb(), actorOf(event), id, email)
  setResponseStatus(event, 201)
  return owner
})
