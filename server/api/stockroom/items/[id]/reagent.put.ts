import { idParamsSchema } from '#shared/types/fields'
import { itemLinkInputSchema } from '#shared/types/stockroom'
import { linkItemToReagent, requireStockroomManager } from '../../../../services/stockroom'

// Which catalog reagent a practical's item draws on (the stockroom's side of the procedure).
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, itemLinkInputSchema)
  return linkItemToReagent(useDb(), actorOf(event), id, input)
})
