import type { StockroomSettings } from '#shared/types/stockroom'
import { requireStockroomReader, stockroomSettings } from '../../services/stockroom'

export default defineEventHandler(async (event): Promise<StockroomSettings> => {
  requireStockroomReader(event)
  return stockroomSettings(useDb())
})
