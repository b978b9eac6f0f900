import { stockroomIdParamsSchema, type OrderDetail } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, stockroomIdParamsSchema)
  return orderSheetDetail(id)
})
