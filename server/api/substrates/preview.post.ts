import { substratePreviewSchema, type SubstratePreview } from '#shared/types/library'
import { analyzeSubstrate } from '#shared/utils/halogenation'
import { depictSubstrate } from '#shared/utils/depiction'

// What the new-substrate form shows while the instructor types: nothing is stored. Positions
// are lettered on the canonical SMILES, as they will be once the substrate is saved.
export default defineEventHandler(async (event): Promise<SubstratePreview> => {
  requireRole(event, 'instructor')
  const { smiles } = await readBodyAs(event, substratePreviewSchema)
  return asBadRequest(() => {
    const { canonicalSmiles, formula, molarMass } = analyzeSubstrate(smiles)
    return {
      canonicalSmiles,
      formula,
      molarMass,
      products: libraryProducts(canonicalSmiles),
      depictionSvg: depictSubstrate(canonicalSmiles, { idPrefix: 'preview' }),
    }
  })
})
