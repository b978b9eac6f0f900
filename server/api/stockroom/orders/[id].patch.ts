import { idParamsSchema } from '#shared/types/fields'
import { orderPatchSchema, type OrderDetail } from '#shared/types/stockroom'

// A sheet being prepared: its title, notes and lines (the list replaces the stored one).
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireOrderSheet(id, 'draft')
  const input = await readBodyAs(event, orderPatchSchema)
  const lines = input.lines ? await checkedOrderLines(input.lines) : undefined
  await useDb().transaction().execute(async (trx) => {
    const sheet = await requireOrderSheet(id, 'draft', trx)
    const before = { title: sheet.title, notes: sheet.notes, lines: await trx.selectFrom('orderLines').selectAll().where('orderId', '=', id).orderBy('position').execute() }
    await trx.updateTable('orderSheets').set({ title: input.title, notes: input.notes, updatedAt: new Date() }).where('id', '=', id).execute()
    if (lines) await writeOrderLines(trx, id, lines)
    await audit(trx, event, { action: 'order.update', entity: 'order_sheet', entityId: id, before, after: input })
  })
  return orderSheetDetail(id)
})
