import { settingsInputSchema, type StockroomSettings } from '#shared/types/stockroom'
import { requireStockroomManager, saveStockroomSettings } from '../../services/stockroom'

export default defineEventHandler(async (event): Promise<StockroomSettings> => {
  requireStockroomManager(event)
  const input = await readBodyAs(event, settingsInputSchema)
  return saveStockroomSettings(useDb(), actorOf(event), input)
})
