import { idParamsSchema } from '#shared/types/fields'
import { courseCopySchema } from '#shared/types/course-copy'
import { copyCourse } from '~~/server/services/courses'

// Saves the copy of the course into a new term (the same input as the preview); answers the new course's id.
export default defineEventHandler(async (event): Promise<{ id: number }> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseCopySchema)
  const copy = await copyCourse(useDb(), actorOf(event), course, input)
  setResponseStatus(event, 201)
  return copy
})
