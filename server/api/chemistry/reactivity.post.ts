import { reactivityInputSchema, type ReactivityResponse } from '#shared/types/chemistry'
import { analyzeSubstrate, canonicalSmiles, relativeReactivities, type Halogen } from '#shared/utils/halogenation'

export default defineEventHandler(async (event): Promise<ReactivityResponse> => {
  requireUser(event)
  const input = await readBodyAs(event, reactivityInputSchema)
  return asBadRequest(() => {
    const analysis = analysisMatching(input.smiles, input.observed.map(o => o.smiles), input.halogen)
    const result = relativeReactivities(analysis, input.observed, { reference: input.reference })
    return {
      products: result.products.map(p => ({
        smiles: p.smiles,
        hydrogens: p.hydrogens,
        carbonClass: p.carbonClass,
        percent: p.percent,
        relativeReactivity: p.relativeReactivity,
      })),
      factors: result.factors,
      factorNotes: result.factorNotes,
      reference: result.reference.description,
      warnings: result.warnings,
    }
  })
})

// Chlorination or bromination? The one whose products include every observed SMILES; a
// bromoalkane chlorinated still carries Br, so the SMILES text alone cannot tell.
function analysisMatching(smiles: string, observed: string[], halogen?: Halogen) {
  if (halogen) return analyzeSubstrate(smiles, { halogen })
  const chlorination = analyzeSubstrate(smiles, { halogen: 'Cl' })
  const wanted = observed.map(o => { try { return canonicalSmiles(o) } catch { return o } })
  const covers = (a: typeof chlorination) => wanted.every(w => a.products.some(p => p.smiles === w))
  if (covers(chlorination)) return chlorination
  const bromination = analyzeSubstrate(smiles, { halogen: 'Br' })
  return covers(bromination) ? bromination : chlorination
}
