import type { CourseListItem } from '#shared/types/course'
import { courseListJson } from '~~/server/services/courses'

export default defineEventHandler(async (event): Promise<CourseListItem[]> => {
  const me = requireUser(event)
  return sendJsonText<CourseListItem[]>(event, await courseListJson(me))
})
