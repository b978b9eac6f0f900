import { idParamsSchema } from '#shared/types/fields'
import type { OrderDetail } from '#shared/types/stockroom'
import { orderSheetDetail, requireStockroomManager } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return orderSheetDetail(useDb(), id)
})
