import { idParamsSchema } from '#shared/types/fields'
import { orderSheetCsv, orderSheetDetail, requireStockroomManager } from '../../../../services/stockroom'

// The order sheet for a spreadsheet: every text cell that could start a formula is neutralised.
// It lives at /stockroom/orders/:id/sheet.csv, not /stockroom/orders/:id.csv: the router reads
// ":id.csv" as a parameter for the whole segment, which would swallow the sheet's own page.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const detail = await orderSheetDetail(useDb(), id)
  setResponseHeaders(event, {
    'Content-Type': 'text/csv; charset=utf-8',
    'Content-Disposition': `attachment; filename="order-sheet-${detail.id}.csv"`,
    'Cache-Control': 'no-store',
  })
  return orderSheetCsv(detail.lines)
})
