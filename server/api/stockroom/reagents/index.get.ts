import type { ReagentListItem } from '#shared/types/stockroom'
import { reagentListItems, requireStockroomReader } from '../../../services/stockroom'

export default defineEventHandler(async (event): Promise<ReagentListItem[]> => {
  requireStockroomReader(event)
  return reagentListItems(useDb())
})
