import { idParamsSchema } from '#shared/types/fields'
import { usageInputSchema, type LotView } from '#shared/types/stockroom'
import { recordUsage, requireStockroomManager } from '../../../../services/stockroom'

// What was taken from a lot (never more than it holds; the first use marks it opened).
export default defineEventHandler(async (event): Promise<LotView> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, usageInputSchema)
  const lot = await recordUsage(useDb(), actorOf(event), id, input)
  setResponseStatus(event, 201)
  return lot
})
