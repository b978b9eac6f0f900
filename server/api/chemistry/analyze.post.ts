import { analyzeInputSchema, type AnalyzeResponse } from '#shared/types/chemistry'
import { analyzeSubstrate, predictDistribution, scaleReactivity } from '#shared/utils/halogenation'
import { depictSubstrate, positionLetter } from '#shared/utils/depiction'
import { findMethod } from '#shared/data/halogenation-methods'

// Without explicit reactivities, each halogen uses its light-initiated method's values.
const DEFAULT_METHOD = { Cl: 'cl2-light', Br: 'br2-light' } as const

export default defineEventHandler(async (event): Promise<AnalyzeResponse> => {
  requireUser(event)
  const input = await readBodyAs(event, analyzeInputSchema)
  return asBadRequest(() => {
    const analysis = analyzeSubstrate(input.smiles, { halogen: input.halogen })
    const method = findMethod(DEFAULT_METHOD[input.halogen])!
    const reactivity = input.reactivity ?? method.reactivity
    const referenceTemperatureC = input.reactivity ? input.referenceTemperatureC ?? 25 : method.temperatureC
    const temperatureC = input.temperatureC ?? referenceTemperatureC
    const used = temperatureC === referenceTemperatureC ? reactivity : scaleReactivity(reactivity, temperatureC, referenceTemperatureC)
    const predicted = predictDistribution(analysis, used)
    const totalH = analysis.products.reduce((sum, p) => sum + p.hydrogens, 0)
    return {
      canonicalSmiles: analysis.canonicalSmiles,
      formula: analysis.formula,
      molarMass: analysis.molarMass,
      halogen: input.halogen,
      reactivity: used,
      temperatureC,
      reactivitySource: input.reactivity ? 'values you entered' : `${method.name}, ${method.temperatureC} °C (${method.source})`,
      products: predicted.map((p, i) => ({
        label: positionLetter(i),
        smiles: p.smiles,
        hydrogens: p.hydrogens,
        carbonClass: p.carbonClass,
        atoms: p.atoms,
        predictedPercent: p.percent,
        statisticalPercent: (p.hydrogens / totalH) * 100,
        depictionSvg: input.productDepictions ? depictSubstrate(p.smiles, { labels: false, width: 150, height: 110, idPrefix: `product-${i}` }) : undefined,
      })),
      depictionSvg: depictSubstrate(input.smiles),
    }
  })
})

