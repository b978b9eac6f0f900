import { idParamsSchema } from '#shared/types/fields'
import { itemLinkInputSchema } from '#shared/types/stockroom'

// Which catalog reagent a practical's item draws on (the stockroom's side of the procedure).
export default defineEventHandler(async (event) => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const item = await useDb().selectFrom('practicalItems').select(['id', 'practicalId', 'name', 'basis', 'reagentId', 'reagentGramsPerMl']).where('id', '=', id).executeTakeFirst()
  if (!item) throw createError({ statusCode: 404, statusMessage: 'Practical item not found' })
  const input = await readBodyAs(event, itemLinkInputSchema)
  if (input.reagentId !== null) {
    const reagent = await requireReagent(input.reagentId).catch(() => invalid([{ field: 'reagentId', message: 'Not a reagent in the catalog' }]))
    if (input.gramsPerMl !== null && reagent.unit !== 'g' && !reagent.density) invalid([{ field: 'gramsPerMl', message: 'A concentration in g/mL needs a reagent counted in g, or one with a density' }])
  }
  if (input.gramsPerMl !== null && item.basis !== 'mL') invalid([{ field: 'gramsPerMl', message: 'Only an item measured in mL can be a solution of the reagent' }])
  const after = { reagentId: input.reagentId, reagentGramsPerMl: input.reagentId === null ? null : input.gramsPerMl }
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('practicalItems').set(after).where('id', '=', id).execute()
    await audit(trx, event, { action: 'practical_item.reagent', entity: 'practical_item', entityId: id, before: { reagentId: item.reagentId, reagentGramsPerMl: item.reagentGramsPerMl }, after })
  })
  return { practicalItemId: id, ...after }
})
