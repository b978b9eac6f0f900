import { idParamsSchema } from '#shared/types/fields'
import { deleteOrderSheet, requireStockroomManager } from '../../../services/stockroom'

// A sheet still being prepared can be thrown away; a requested one is a record of what was asked.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await deleteOrderSheet(useDb(), actorOf(event), id)
  setResponseStatus(event, 204)
  return null
})
