import { idParamsSchema } from '#shared/types/fields'
import { itemsInputSchema, type ItemView, type QuantitiesView } from '#shared/types/practical'
import { computeQuantities } from '#shared/utils/procedure'

// The per-unit scale: the list replaces the stored one, in the order given.
export default defineEventHandler(async (event): Promise<{ items: ItemView[], quantities: QuantitiesView }> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requirePracticalAccess(event, id, 'manage')
  const input = await readBodyAs(event, itemsInputSchema)
  const items = await checkedItems(input.items)
  const quantities = asBadRequest(() => computeQuantities(items))

  await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalItems').select(['role', 'name', 'smiles', 'molarMass', 'density', 'basis', 'amount'])
      .where('practicalId', '=', id).orderBy('position').execute()
    await replacePracticalItems(trx, id, items)
    await touchPractical(trx, id)
    await audit(trx, event, { action: 'practical.items', entity: 'practical', entityId: id, before, after: items })
  })
  return { items: await practicalItemViews(id), quantities }
})
