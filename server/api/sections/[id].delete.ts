import { idParamsSchema } from '#shared/types/fields'
import { deleteSection } from '~~/server/services/sections'

// Only an empty section may go: see deleteSection.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section } = await requireSectionAccess(event, id, 'manage')
  await deleteSection(useDb(), actorOf(event), section)
  setResponseStatus(event, 204)
  return null
})
