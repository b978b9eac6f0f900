import { idParamsSchema } from '#shared/types/fields'
import type { SectionRosterView } from '#shared/types/roster'
import { assignStations } from '~~/server/services/roster'

// Everyone active, in name order, onto stations 1, 2, … with seats 1..students per station.
export default defineEventHandler(async (event): Promise<SectionRosterView> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section } = await requireSectionAccess(event, id, 'manage')
  return assignStations(useDb(), actorOf(event), section)
})
