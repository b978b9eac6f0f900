import { idParamsSchema } from '#shared/types/fields'
import { requireStockroomManager, sendOrderSheet } from '../../../../services/stockroom'

// One purchase request per supplier, queued with the sheet marked sent (both or neither).
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return sendOrderSheet(useDb(), actorOf(event), id)
})
