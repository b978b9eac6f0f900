import { idParamsSchema } from '#shared/types/fields'
import { deleteReagent, requireStockroomManager } from '../../../services/stockroom'

// Only a reagent nothing refers to: stock and practicals keep their history otherwise.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await deleteReagent(useDb(), actorOf(event), id)
  setResponseStatus(event, 204)
  return null
})
