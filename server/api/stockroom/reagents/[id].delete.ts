import { idParamsSchema } from '#shared/types/fields'
// Only a reagent nothing refers to: stock and practicals keep their history otherwise.
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const reagent = await requireReagent(id)
  await useDb().transaction().execute(async (trx) => {
    const lots = await trx.selectFrom('reagentLots').select('id').where('reagentId', '=', id).limit(1).execute()
    const items = await trx.selectFrom('practicalItems').select('id').where('reagentId', '=', id).limit(1).execute()
    if (lots.length || items.length) {
      throw createError({ statusCode: 409, statusMessage: lots.length ? 'This reagent has stock lots; it stays in the catalog' : 'Practicals draw on this reagent; unlink their items first' })
    }
    await trx.deleteFrom('reagents').where('id', '=', id).execute()
    await audit(trx, event, { action: 'reagent.delete', entity: 'reagent', entityId: id, before: reagentFields(reagent) })
  })
  setResponseStatus(event, 204)
  return null
})
