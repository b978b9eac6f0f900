import { idParamsSchema } from '#shared/types/fields'
import type { CourseDetail } from '#shared/types/course'
import { courseDetail } from '~~/server/services/courses'

export default defineEventHandler(async (event): Promise<CourseDetail> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return courseDetail(await requireCourseAccess(event, id))
})
