import type { StockroomSettings } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<StockroomSettings> => {
  requireStockroomReader(event)
  return stockroomSettings()
})
