import { idParamsSchema } from '#shared/types/fields'
import { reagentPatchSchema, type ReagentDetail } from '#shared/types/stockroom'
import { reagentDetailView, requireStockroomManager, updateReagent } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, reagentPatchSchema)
  const db = useDb()
  return reagentDetailView(db, await updateReagent(db, actorOf(event), id, input), me)
})
