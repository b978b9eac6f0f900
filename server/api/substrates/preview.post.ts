import { substratePreviewSchema, type SubstratePreview } from '#shared/types/library'
import { libraryProducts, substrateAnalysis, substrateDepiction } from '~~/server/services/library'

// What the new-substrate form shows while the instructor types: nothing is stored. Positions
// are lettered on the canonical SMILES, as they will be once the substrate is saved. The
// analyses and the drawing come from the engine worker (and are kept for the save that follows).
export default defineEventHandler(async (event): Promise<SubstratePreview> => {
  requireRole(event, 'instructor')
  const { smiles } = await readBodyAs(event, substratePreviewSchema)
  return asBadRequest(async () => {
    const { canonicalSmiles, formula, molarMass } = await substrateAnalysis(smiles)
    const [products,
      depictionSvg] = await Promise.all([libraryProducts(canonicalSmiles), substrateDepiction(canonicalSmiles, { idPrefix: 'preview' })])
    return { canonicalSmiles, formula, molarMass, products, depictionSvg }
  })
})
