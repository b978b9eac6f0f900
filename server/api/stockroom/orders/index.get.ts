import type { OrderSummary } from '#shared/types/stockroom'
import { orderSheetSummaries, requireStockroomManager } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<OrderSummary[]> => {
  requireStockroomManager(event)
  return orderSheetSummaries(useDb())
})
