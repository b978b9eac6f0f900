import { referenceInputSchema, referenceParamsSchema, type ReferenceView } from '#shared/types/library'
import { requireLibraryEntry, resolveReferencePercents, substrateReferenceViews } from '~~/server/services/library'

// Sets the substrate's reference distribution for one reagent family (owner of the entry only):
// runs of practicals with that substrate and reagent are then judged against it.
export default defineEventHandler(async (event): Promise<{ references: ReferenceView[] }> => {
  requireRole(event, 'instructor')
  const { id, reagent } = readParamsAs(event, referenceParamsSchema)
  const { me, row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const input = await readBodyAs(event, referenceInputSchema)
  const percents = await resolveReferencePercents(input, substrate, reagent)
  await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('substrateReferences').select(['percents', 'source', 'sourceKind'])
      .where('substrateId', '=', id).where('reagent', '=', reagent).executeTakeFirst()
    const values = { percents: JSON.stringify(percents), source: input.source, sourceKind: input.sourceKind, updatedBy: me.id, updatedAt: new Date() }
    await trx.insertInto('substrateReferences').values({ substrateId: id, reagent, ...values })
      .onConflict((oc) => oc.columns(['substrateId', 'reagent']).doUpdateSet(values)).execute()
    await trx.updateTable('substrates').set({ updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'substrate.reference', entity: 'substrate', entityId: id, before: before ?? null, after: { reagent, percents, source: input.source, sourceKind: input.sourceKind } })
  })
  return { references: await substrateReferenceViews(id) }
})
