import { idParamsSchema } from '#shared/types/fields'
import { usageInputSchema, type LotView } from '#shared/types/stockroom'

// What was taken from a lot. The lot row is locked so two entries cannot both take the last of it;
// the first use also marks the lot opened.
export default defineEventHandler(async (event): Promise<LotView> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireLot(id)
  const input = await readBodyAs(event, usageInputSchema)
  if (input.practicalId !== null) {
    const practical = await useDb().selectFrom('practicals').select('id').where('id', '=', input.practicalId).executeTakeFirst()
    if (!practical) invalid([{ field: 'practicalId', message: 'No such practical' }])
  }
  await useDb().transaction().execute(async (trx) => {
    const lot = await trx.selectFrom('reagentLots').selectAll().where('id', '=', id).forUpdate().executeTakeFirstOrThrow()
    const used = await trx.selectFrom('reagentUsage').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('amount'), eb.val(0)).as('total')).where('lotId', '=', id).executeTakeFirstOrThrow()
    const left = lot.quantity - Number(used.total)
    if (input.amount > left + 1e-9) invalid([{ field: 'amount', message: `More than the lot holds (${Math.round(left * 1000) / 1000} ${lot.unit} left)` }], 422)
    if (input.usedOn < lot.receivedOn) invalid([{ field: 'usedOn', message: 'Before the lot was received' }])
    const created = await trx.insertInto('reagentUsage').values({ lotId: id, usedOn: input.usedOn, amount: input.amount, note: input.note, practicalId: input.practicalId, recordedBy: me.id }).returning('id').executeTakeFirstOrThrow()
    if (!lot.openedOn) await trx.updateTable('reagentLots').set({ openedOn: input.usedOn, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'lot.use', entity: 'reagent_lot', entityId: id, after: { usageId: created.id, ...input, unit: lot.unit } })
  })
  setResponseStatus(event, 201)
  return (await requireLot(id)).view
})
