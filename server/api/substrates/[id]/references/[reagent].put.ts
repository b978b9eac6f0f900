import { referenceInputSchema, referenceParamsSchema, type ReferenceView } from '#shared/types/library'
import { requireLibraryEntry, resolveReferencePercents, setSubstrateReference, substrateReferenceViews } from '~~/server/services/library'

// Sets the substrate's reference distribution for one reagent family (owner of the entry only):
// runs of practicals with that substrate and reagent are then judged against it.
export default defineEventHandler(async (event): Promise<{ references: ReferenceView[] }> => {
  requireRole(event, 'instructor')
  const { id, reagent } = readParamsAs(event, referenceParamsSchema)
  const { row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const input = await readBodyAs(event, referenceInputSchema)
  const percents = await resolveReferencePercents(input, substrate, reagent)
  await setSubstrateReference(useDb(), actorOf(event), id, reagent, percents, input)
  return { references: await substrateReferenceViews(id) }
})
