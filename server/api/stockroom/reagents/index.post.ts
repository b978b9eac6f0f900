import { reagentInputSchema, type ReagentDetail } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomManager(event)
  const input = await readBodyAs(event, reagentInputSchema)
  const values = { ...input, ...(await reagentIdentity(input)) }
  await refuseDuplicateReagentName(values.name)
  const row = await useDb().transaction().execute(async (trx) => {
    const created = await trx.insertInto('reagents').values(values).returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'reagent.create', entity: 'reagent', entityId: created.id, after: values })
    return created
  })
  setResponseStatus(event, 201)
  return reagentDetailView(row, me)
})
