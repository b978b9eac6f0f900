import { idParamsSchema } from '#shared/types/fields'
import type { SectionView } from '#shared/types/section'
import { sectionViews } from '~~/server/services/sections'

type SectionWithCourse = SectionView & {
  course: { id: number, code: string, title: string, term: string, timezone: string }
  role: string
}

export default defineEventHandler(async (event): Promise<SectionWithCourse> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course, role } = await requireSectionAccess(event, id, 'view')
  const [view] = await sectionViews({ ids: [id] })
  return {
    ...view!,
    course: { id: course.id, code: course.code, title: course.title, term: course.term, timezone: course.timezone },
    role,
  }
})
