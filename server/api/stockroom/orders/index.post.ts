import { orderCreateSchema, type OrderDetail } from '#shared/types/stockroom'
import { createOrderSheet, requireStockroomManager } from '../../../services/stockroom'

// A new sheet: from the forecast's shortfalls for a range, or empty.
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const input = await readBodyAs(event, orderCreateSchema)
  const detail = await createOrderSheet(useDb(), actorOf(event), input)
  setResponseStatus(event, 201)
  return detail
})
