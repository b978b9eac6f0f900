import { idParamsSchema } from '#shared/types/fields'
import { type ReagentDetail } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomReader(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return reagentDetailView(await requireReagent(id), me)
})
