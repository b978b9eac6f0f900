import { courseInputSchema, type CourseListItem } from '#shared/types/course'
import { createCourse } from '~~/server/services/courses'

export default defineEventHandler(async (event): Promise<CourseListItem> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, courseInputSchema)
  const course = await createCourse(useDb(), actorOf(event), me.id, input)
  setResponseStatus(event, 201)
  return course
})
