import { idParamsSchema } from '#shared/types/fields'
import { closeOrderSchema, type OrderDetail } from '#shared/types/stockroom'
import { closeOrderRest, requireStockroomManager } from '../../../../services/stockroom'

// The lines still open will not come: the order is closed with a reason, which the sheet keeps.
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, closeOrderSchema)
  return closeOrderRest(useDb(), actorOf(event), id, input)
})
