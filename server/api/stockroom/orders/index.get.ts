import type { OrderSummary } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<OrderSummary[]> => {
  requireStockroomManager(event)
  return orderSheetSummaries()
})
