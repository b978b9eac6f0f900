import { idParamsSchema } from '#shared/types/fields'
import type { CourseDetail } from '#shared/types/course'

export default defineEventHandler(async (event): Promise<CourseDetail> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course, role } = await requireCourseAccess(event, id)
  const owners = await useDb().selectFrom('courseOwners').innerJoin('users', 'users.id', 'courseOwners.userId')
    .select(['users.id', 'users.name', 'users.email']).where('courseOwners.courseId', '=', id).orderBy('users.name').execute()
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
    rubric: course.rubric,
    owners: role === 'student' ? [] : owners,
    role,
  }
})
