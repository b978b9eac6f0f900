import { idParamsSchema } from '#shared/types/fields'
import { receiveInputSchema, type OrderDetail } from '#shared/types/stockroom'
import { addMonths, isoDateOf } from '#shared/utils/dates'

// The delivery came: one lot per catalog line that arrived (containers × size, the catalog's
// shelf life unless an expiry is given), and the sheet is closed. One transaction, audited.
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const sheet = await requireOrderSheet(id, 'sent')
  const input = await readBodyAs(event, receiveInputSchema)
  const lines = await useDb().selectFrom('orderLines').selectAll().where('orderId', '=', id).execute()
  const byId = new Map(lines.map((l) => [l.id, l]))
  input.lines.forEach((r, i) => {
    if (!byId.has(r.lineId)) invalid([{ field: `lines.${i}.lineId`, message: 'Not a line of this sheet' }])
    if (r.expiresOn && r.expiresOn < input.receivedOn) invalid([{ field: `lines.${i}.expiresOn`, message: 'The expiry is before the received date' }])
  })
  if (sheet.sentAt && input.receivedOn < isoDateOf(sheet.sentAt)) invalid([{ field: 'receivedOn', message: 'Before the order was sent' }])
  const reagentIds = [...new Set(lines.map((l) => l.reagentId).filter((r): r is number => r !== null))]
  const reagents = new Map((reagentIds.length ? await useDb().selectFrom('reagents').selectAll().where('id', 'in', reagentIds).execute() : []).map((r) => [r.id, r]))

  await useDb().transaction().execute(async (trx) => {
    await requireOrderSheet(id, 'sent', trx)
    const created: number[] = []
    for (const r of input.lines) {
      const line = byId.get(r.lineId)!
      const reagent = line.reagentId === null ? undefined : reagents.get(line.reagentId)
      if (!reagent || r.containers === 0 || line.unit === 'each') continue
      const lot = await trx.insertInto('reagentLots').values({
        reagentId: reagent.id, lotCode: r.lotCode, quantity: stockQuantityIn(reagent, r.containers * line.containerSize, line.unit),
        unit: reagent.unit, containers: r.containers, location: r.location, receivedOn: input.receivedOn, orderLineId: line.id, createdBy: me.id,
        expiresOn: r.expiresOn ?? (reagent.shelfLifeMonths ? addMonths(input.receivedOn, reagent.shelfLifeMonths) : null),
      }).returning('id').executeTakeFirstOrThrow()
      created.push(lot.id)
    }
    await trx.updateTable('orderSheets').set({ status: 'received', receivedOn: input.receivedOn, receivedBy: me.id, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'order.receive', entity: 'order_sheet', entityId: id, after: { ...input, lots: created } })
  })
  return orderSheetDetail(id)
})
