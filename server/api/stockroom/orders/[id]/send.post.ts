import { idParamsSchema } from '#shared/types/fields'
import { type OrderDetail } from '#shared/types/stockroom'

// One purchase request per supplier, queued in the same transaction that marks the sheet sent:
// both or neither. The dedupe key (order and supplier) means a retry never mails twice.
export default defineEventHandler(async (event): Promise<OrderDetail & { requests: Array<{ supplierEmail: string, messageId: number }> }> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireOrderSheet(id, 'draft')
  const detail = await orderSheetDetail(id)
  const requests = purchaseRequests(detail)
  const queued = await useDb().transaction().execute(async (trx) => {
    await requireOrderSheet(id, 'draft', trx)
    const out: Array<{ supplierEmail: string, messageId: number }> = []
    for (const request of requests) {
      const mail = purchaseRequestMail(detail, request, me)
      const { id: messageId } = await queueMail(trx, {
        key: `order:${id}:${request.supplierEmail}`, kind: 'purchase-request', to: [request.supplierEmail], createdBy: me.id, ...mail,
      })
      out.push({ supplierEmail: request.supplierEmail, messageId })
    }
    await trx.updateTable('orderSheets').set({ status: 'sent', sentAt: new Date(), sentBy: me.id, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'order.send', entity: 'order_sheet', entityId: id, after: { requests: out } })
    return out
  })
  return { ...(await orderSheetDetail(id)), requests: queued }
})
