import { idParamsSchema } from '#shared/types/fields'
import type { SectionRosterView } from '#shared/types/roster'
import { loadSectionRoster } from '~~/server/services/roster'

// Who is in a section and where they sit: the course's instructors and this section's TAs only.
export default defineEventHandler(async (event): Promise<SectionRosterView> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section } = await requireSectionAccess(event, id, 'roster')
  return loadSectionRoster(useDb(), section)
})
