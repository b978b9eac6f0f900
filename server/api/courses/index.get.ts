import type { CourseListItem } from '#shared/types/course'
import { courseList } from '~~/server/services/courses'

export default defineEventHandler(async (event): Promise<CourseListItem[]> => {
  const me = requireUser(event)
  return courseList(me)
})
