import type { StockroomOverview } from '#shared/types/stockroom'
import { requireStockroomManager, stockroomOverview } from '../../services/stockroom'

// The coordinator's first screen: what is short in the next four weeks, what runs low or
// expires, and the order sheets in play.
export default defineEventHandler(async (event): Promise<StockroomOverview> => {
  const me = requireStockroomManager(event)
  return stockroomOverview(useDb(), me)
})
