import { idParamsSchema } from '#shared/types/fields'
import { windowsInputSchema, type LibraryProduct, type SubstrateWindowView } from '#shared/types/library'
import {
  libraryProducts, renameLibraryProducts, requireLibraryEntry, resolveProductNames, resolveWindows, saveSubstrateWindows,
  substrateProductNamer, windowView,
} from '~~/server/services/library'

// Replaces every window of the substrate at once: overlaps are judged over the whole set. The
// products' names, when sent, are replaced with them in the same transaction.
export default defineEventHandler(async (event): Promise<{ windows: SubstrateWindowView[], products: LibraryProduct[] }> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const input = await readBodyAs(event, windowsInputSchema)
  const products = await libraryProducts(substrate.smiles)
  const values = await resolveWindows(input.windows, products, substrate.name)
  const names = input.names ? await resolveProductNames(input.names, products, substrate.name) : null
  const saved = await saveSubstrateWindows(useDb(), actorOf(event), id, values, names)
  const named = renameLibraryProducts(products, await substrateProductNamer(useDb(), id))
  return { windows: saved.sort((a, b) => a.rtMin - b.rtMin).map((w) => windowView(w, named)), products: named }
})
