import { idParamsSchema } from '#shared/types/fields'
// A sheet still being prepared can be thrown away; a requested one is a record of what was asked.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireOrderSheet(id, 'draft')
  await useDb().transaction().execute(async (trx) => {
    const sheet = await requireOrderSheet(id, 'draft', trx)
    await trx.deleteFrom('orderSheets').where('id', '=', id).execute()
    await audit(trx, event, { action: 'order.delete', entity: 'order_sheet', entityId: id, before: { title: sheet.title } })
  })
  setResponseStatus(event, 204)
  return null
})
