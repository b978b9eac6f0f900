import { idParamsSchema } from '#shared/types/fields'
import { itemsInputSchema, type ItemView, type QuantitiesView } from '#shared/types/practical'
import { computeQuantities } from '#shared/utils/procedure'
import { checkedItems, practicalItemViews, savePracticalItems } from '~~/server/services/practicals'

// The per-unit scale: the list replaces the stored one, in the order given.
export default defineEventHandler(async (event): Promise<{ items: ItemView[], quantities: QuantitiesView }> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requirePracticalAccess(event, id, 'manage')
  const input = await readBodyAs(event, itemsInputSchema)
  const items = await checkedItems(input.items)
  const quantities = asBadRequest(() => computeQuantities(items))
  await savePracticalItems(useDb(), actorOf(event), id, items)
  return { items: await practicalItemViews(id), quantities }
})
