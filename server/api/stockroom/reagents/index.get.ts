import type { ReagentListItem } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<ReagentListItem[]> => {
  requireStockroomReader(event)
  return reagentListItems()
})
