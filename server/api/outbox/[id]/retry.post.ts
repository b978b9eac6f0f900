import { idParamsSchema } from '#shared/types/fields'
import { retryMessage } from '../../../services/outbox'

export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { id } = readParamsAs(event, idParamsSchema)
  const result = await retryMessage(useDb(), me, id)
  setResponseStatus(event, 202)
  return result
})
