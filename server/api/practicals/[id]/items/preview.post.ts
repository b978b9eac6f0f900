import { idParamsSchema } from '#shared/types/fields'
import { itemsInputSchema, type QuantitiesView } from '#shared/types/practical'
import { computeQuantities } from '#shared/utils/procedure'
import { checkedItems } from '~~/server/services/practicals'

// The scale editor's live conversion, before anything is saved. It runs here rather than in the
// page so the page does not load openchemlib (molar masses from SMILES).
export default defineEventHandler(async (event): Promise<QuantitiesView> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requirePracticalAccess(event, id, 'manage')
  const input = await readBodyAs(event, itemsInputSchema)
  const items = await checkedItems(input.items)
  return asBadRequest(() => computeQuantities(items))
})
