import { reagentInputSchema, type ReagentDetail } from '#shared/types/stockroom'
import { createReagent, reagentDetailView, requireStockroomManager } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomManager(event)
  const input = await readBodyAs(event, reagentInputSchema)
  const db = useDb()
  const row = await createReagent(db, actorOf(event), input)
  setResponseStatus(event, 201)
  return reagentDetailView(db, row, me)
})
