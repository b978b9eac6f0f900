import { idParamsSchema } from '#shared/types/fields'
import { orderPatchSchema, type OrderDetail } from '#shared/types/stockroom'
import { requireStockroomManager, updateOrderSheet } from '../../../services/stockroom'

// A sheet being prepared: its title, notes and lines (the list replaces the stored one).
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, orderPatchSchema)
  return updateOrderSheet(useDb(), actorOf(event), id, input)
})
