import { idParamsSchema } from '#shared/types/fields'
import { lotPatchSchema, type LotView } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<LotView> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { row } = await requireLot(id)
  const input = await readBodyAs(event, lotPatchSchema)
  const openedOn = input.openedOn === undefined ? row.openedOn : input.openedOn
  const expiresOn = input.expiresOn === undefined ? row.expiresOn : input.expiresOn
  if (openedOn && openedOn < row.receivedOn) invalid([{ field: 'openedOn', message: 'Opened before it was received?' }])
  if (expiresOn && expiresOn < row.receivedOn) invalid([{ field: 'expiresOn', message: 'The expiry is before the received date' }])
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('reagentLots').set({ ...input, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'lot.update', entity: 'reagent_lot', entityId: id, before: { lotCode: row.lotCode, location: row.location, openedOn: row.openedOn, expiresOn: row.expiresOn }, after: input })
  })
  return (await requireLot(id)).view
})
