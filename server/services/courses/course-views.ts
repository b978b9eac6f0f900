import { sql } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import { visibleCourseIdQuery, type CourseScope } from '../../utils/access'
import { readTextOnceCompiled, useDb } from '../../utils/db'
import type { CourseDetail } from '#shared/types/course'

// Courses as the pages read them; the caller's scope comes from requireCourseAccess / visibleCourseIdQuery.

// Written as JSON.stringify writes it: row_to_json keeps the select's key order, escapes as it
// does, and leaves out the spaces that json_agg puts between elements.
const courseListText = readTextOnceCompiled((db, role: SessionUser['role'], userId: number) => {
  const courses = db.selectFrom('courses').select(['id', 'code', 'title', 'term'])
    .where('id', 'in', visibleCourseIdQuery({ id: userId, role, name: '' }))
  return sql<{ text: string }>`select '[' || coalesce(string_agg(row_to_json(c)::text, ',' order by c.term desc, c.code), '') || ']' as text
    from (${courses}) c`
})

/** The JSON of the courses the caller may see (CourseListItem[]), newest term first, in one query (the scope is a subquery). */
export function courseListJson(me: SessionUser): Promise<string> {
  return courseListText(me.role, me.id)
}

/** The course with its settings; students do not see the owners' list. */
export async function courseDetail({ course, role }: Pick<CourseScope, 'course' | 'role'>): Promise<CourseDetail> {
  const owners = await useDb().selectFrom('courseOwners').innerJoin('users', 'users.id', 'courseOwners.userId')
    .select(['users.id', 'users.name', 'users.email']).where('courseOwners.courseId', '=', course.id).orderBy('users.name').execute()
  return {
    id: course.id,
    code: course.code,
    title: course.title,
    term: course.term,
    timezone: course.timezone,
    outlierTest: course.outlierTest,
    outlierAlpha: course.outlierAlpha === 0.1 ? 0.1 : 0.05,
    zscoreLimit: course.zscoreLimit,
    accuracyTolerancePercent: course.accuracyTolerancePercent,
    releasePolicy: course.releasePolicy,
    resubmitDays: course.resubmitDays,
    rubric: course.rubric,
    owners: role === 'student' ? [] : owners,
    role,
  }
}
