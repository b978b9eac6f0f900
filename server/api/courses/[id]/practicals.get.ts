import { idParamsSchema } from '#shared/types/fields'
import type { PracticalListItem } from '#shared/types/practical'
import { coursePracticals } from '~~/server/services/practicals'

// A course's practicals, limited to the caller's sections for TAs and students.
export default defineEventHandler(async (event): Promise<PracticalListItem[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return coursePracticals(await requireCourseAccess(event, id))
})
