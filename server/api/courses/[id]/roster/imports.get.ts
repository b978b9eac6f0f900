import { idParamsSchema } from '#shared/types/fields'
import type { RosterImportHistoryItem } from '#shared/types/roster'
import { rosterImportHistory } from '~~/server/services/roster'

export default defineEventHandler(async (event): Promise<RosterImportHistoryItem[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  return rosterImportHistory(useDb(), course.id)
})
