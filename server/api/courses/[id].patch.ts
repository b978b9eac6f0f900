import { idParamsSchema } from '#shared/types/fields'
import { courseInputSchema } from '#shared/types/course'
import { updateCourse } from '~~/server/services/courses'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseInputSchema)
  await updateCourse(useDb(), actorOf(event), course, input)
  setResponseStatus(event, 204)
  return null
})
