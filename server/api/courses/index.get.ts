import type { CourseListItem } from '#shared/types/course'

export default defineEventHandler(async (event): Promise<CourseListItem[]> => {
  const me = requireUser(event)
  const ids = await visibleCourseIds(me)
  if (!ids.length) return []
  return useDb().selectFrom('courses').select(['id', 'code', 'title', 'term'])
    .where('id', 'in', ids).orderBy('term', 'desc').orderBy('code').execute()
})
