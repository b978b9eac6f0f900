import { idParamsSchema } from '#shared/types/fields'
import { windowsInputSchema, type LibraryProduct, type SubstrateWindowView } from '#shared/types/library'
import { libraryProducts, renameLibraryProducts, requireLibraryEntry, resolveProductNames, resolveWindows, substrateProductNamer, windowView } from '~~/server/services/library'

// Replaces every window of the substrate at once: overlaps are judged over the whole set. The
// products' names, when sent, are replaced with them in the same transaction.
export default defineEventHandler(async (event): Promise<{ windows: SubstrateWindowView[], products: LibraryProduct[] }> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const input = await readBodyAs(event, windowsInputSchema)
  const products = await libraryProducts(substrate.smiles)
  const values = await resolveWindows(input.windows, products, substrate.name)
  const names = input.names ? await resolveProductNames(input.names, products, substrate.name) : null
  const saved = await useDb().transaction().execute(async (trx) => {
    const before = await trx.deleteFrom('substrateWindows').where('substrateId', '=', id)
      .returning(['kind', 'productSmiles', 'label', 'rtMin', 'rtMax', 'responseFactor']).execute()
    const rows = values.length
      ? await trx.insertInto('substrateWindows').values(values.map((v) => ({ ...v, substrateId: id }))).returningAll().execute()
      : []
    if (names) {
      const beforeNames = await trx.deleteFrom('substrateProductNames').where('substrateId', '=', id).returning(['productSmiles', 'name']).execute()
      if (names.length) await trx.insertInto('substrateProductNames').values(names.map((n) => ({ ...n, substrateId: id, updatedBy: me.id }))).execute()
      await audit(trx, event, { action: 'substrate.names', entity: 'substrate', entityId: id, before: beforeNames, after: names })
    }
    await trx.updateTable('substrates').set({ updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, { action: 'substrate.windows', entity: 'substrate', entityId: id, before, after: values })
    return rows
  })
  const named = renameLibraryProducts(products, await substrateProductNamer(useDb(), id))
  return { windows: saved.sort((a, b) => a.rtMin - b.rtMin).map((w) => windowView(w, named)), products: named }
})
