import { idParamsSchema } from '#shared/types/fields'
import { lotInputSchema, type LotView } from '#shared/types/stockroom'
import { addMonths } from '#shared/utils/dates'

// Stock that arrives outside an order sheet (a stocktake, a transfer). Quantities are kept in the
// reagent's unit; a lot given in the other one is converted through the reagent's density.
export default defineEventHandler(async (event): Promise<LotView> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const reagent = await requireReagent(id)
  const input = await readBodyAs(event, lotInputSchema)
  const quantity = stockQuantityIn(reagent, input.quantity, input.unit)
  const lot = await useDb().transaction().execute(async (trx) => {
    const created = await trx.insertInto('reagentLots').values({
      reagentId: id, lotCode: input.lotCode, quantity, unit: reagent.unit, containers: input.containers, location: input.location,
      receivedOn: input.receivedOn, openedOn: input.openedOn, createdBy: me.id,
      expiresOn: input.expiresOn ?? (reagent.shelfLifeMonths ? addMonths(input.receivedOn, reagent.shelfLifeMonths) : null),
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'lot.create', entity: 'reagent_lot', entityId: created.id, after: { reagentId: id, ...input, quantity, unit: reagent.unit } })
    return created
  })
  setResponseStatus(event, 201)
  return (await requireLot(lot.id)).view
})
