import type { SectionListItem } from '#shared/types/section'
import { sectionViews } from '~~/server/services/sections'

// "My sections": a TA's across every course, an instructor's owned courses', everything for the
// coordinator's schedule, a student's own.
export default defineEventHandler(async (event): Promise<SectionListItem[]> => {
  const me = requireUser(event)
  const db = useDb()
  let ids: number[]
  if (me.role === 'ta') {
    ids = (await db.selectFrom('sectionTas').select('sectionId').where('userId', '=', me.id).execute()).map((r) => r.sectionId)
  } else if (me.role === 'student') {
    ids = (await db.selectFrom('enrollments').select('sectionId').where('userId', '=', me.id).where('status', '=', 'active').execute())
      .map((r) => r.sectionId)
  } else {
    const courseIds = await visibleCourseIds(me)
    ids = courseIds.length
      ? (await db.selectFrom('sections').select('id').where('courseId', 'in', courseIds).execute())
          .map((r) => r.id)
      : []
  }
  const views = await sectionViews({ ids })
  const courses = new Map((await db.selectFrom('courses').select(['id', 'code', 'title', 'term'])
    .where('id', 'in', [...new Set(views.map((v) => v.courseId)), -1]).execute()).map((c) => [c.id, c]))
  return views.map((v) => ({ ...v, course: courses.get(v.courseId)! }))
})
