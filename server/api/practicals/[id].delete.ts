import { idParamsSchema } from '#shared/types/fields'
import { deletePractical } from '~~/server/services/practicals'

// Refused once results exist (released results, or any upload): see deletePractical.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { practical } = await requirePracticalAccess(event, id, 'manage')
  await deletePractical(useDb(), actorOf(event), practical)
  setResponseStatus(event, 204)
  return null
})
