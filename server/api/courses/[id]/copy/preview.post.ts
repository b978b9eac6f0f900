import { idParamsSchema } from '#shared/types/fields'
import { courseCopySchema, type CourseCopyPreview } from '#shared/types/course-copy'
import { previewCourseCopy } from '~~/server/services/courses'

// The copy of the course into a new term as it would be saved; writes nothing.
export default defineEventHandler(async (event): Promise<CourseCopyPreview> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseCopySchema)
  return previewCourseCopy(useDb(), course, input)
})
