import { libraryIdParamsSchema, windowsInputSchema, type SubstrateWindowView } from '#shared/types/library'

// Replaces every window of the substrate at once: overlaps are judged over the whole set.
export default defineEventHandler(async (event): Promise<{ windows: SubstrateWindowView[] }> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, libraryIdParamsSchema)
  const { row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const input = await readBodyAs(event, windowsInputSchema)
  const products = libraryProducts(substrate.smiles)
  const values = resolveWindows(input.windows, products, substrate.name)
  const saved = await useDb().transaction().execute(async (trx) => {
    const before = await trx.deleteFrom('substrateWindows').where('substrateId', '=', id)
      .returning(['kind', 'productSmiles', 'label', 'rtMin', 'rtMax', 'responseFactor']).execute()
    const rows = values.length
      ? await trx.insertInto('substrateWindows').values(values.map((v) => ({ ...v, substrateId: id }))).returningAll().execute()
      : []
    await trx.updateTable('substrates').set({ updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'substrate.windows', entity: 'substrate', entityId: id, before, after: values })
    return rows
  })
  return { windows: saved.sort((a, b) => a.rtMin - b.rtMin).map((w) => windowView(w, products)) }
})
