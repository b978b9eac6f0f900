import { idParamsSchema } from '#shared/types/fields'
import { linkDismissSchema } from '#shared/types/stockroom'
import { dismissItemLink, requireStockroomManager } from '../../../../services/stockroom'

// A proposed link the coordinator says is wrong: the forecast stops proposing it.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, linkDismissSchema)
  return dismissItemLink(useDb(), actorOf(event), id, input)
})
