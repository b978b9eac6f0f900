import { stockroomIdParamsSchema, type ReagentDetail } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomReader(event)
  const { id } = readParamsAs(event, stockroomIdParamsSchema)
  return reagentDetailView(await requireReagent(id), me)
})
