import { z } from 'zod'
import type { SectionView } from '#shared/types/section'

const paramsSchema = z.object({ id: z.coerce.number().int().positive() })

export default defineEventHandler(async (event): Promise<SectionView[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, paramsSchema)
  const scope = await requireCourseAccess(event, id)
  return sectionViews({ courseId: id, ids: scope.sectionIds ?? undefined })
})
