import { idParamsSchema } from '#shared/types/fields'
import { lotPatchSchema, type LotView } from '#shared/types/stockroom'
import { requireStockroomManager, updateLot } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<LotView> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, lotPatchSchema)
  return updateLot(useDb(), actorOf(event), id, input)
})
