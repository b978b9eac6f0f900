import { idParamsSchema } from '#shared/types/fields'
import type { SectionView } from '#shared/types/section'
import { sectionViews } from '~~/server/services/sections'

export default defineEventHandler(async (event): Promise<SectionView[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireCourseAccess(event, id)
  return sectionViews({ courseId: id, ids: scope.sectionIds ?? undefined })
})
