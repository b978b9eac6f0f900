import { idParamsSchema } from '#shared/types/fields'
import { receiveInputSchema, type OrderDetail } from '#shared/types/stockroom'
import { receiveOrder, requireStockroomManager } from '../../../../services/stockroom'

// A delivery came, perhaps part of the order: lots for the catalog lines that arrived; what did not stays open.
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, receiveInputSchema)
  return receiveOrder(useDb(), actorOf(event), id, input)
})
