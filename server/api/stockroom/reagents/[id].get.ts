import { idParamsSchema } from '#shared/types/fields'
import type { ReagentDetail } from '#shared/types/stockroom'
import { reagentDetailView, requireReagent, requireStockroomReader } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomReader(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const db = useDb()
  return reagentDetailView(db, await requireReagent(db, id), me)
})
