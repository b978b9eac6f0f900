// What the two public chemistry routes compute, as plain functions of their validated input:
// they run in the engine worker (server/engines/worker.ts), never on the request loop.
import type { AnalyzeResponse, ReactivityResponse, analyzeInputSchema, reactivityInputSchema } from '../../shared/types/chemistry'
import type { z } from 'zod'
import { readerSource } from '../../shared/utils/source-line'
import {
  analyzeSubstrate,
  canonicalSmiles,
  predictDistribution,
  relativeReactivities,
  scaleReactivity,
  type Halogen,
} from '../../shared/utils/halogenation'
import { depictSubstrate, positionLetter } from '../../shared/utils/depiction'
import { findMethod } from '../../shared/data/halogenation-methods'

export type AnalyzeRequest = z.output<typeof analyzeInputSchema>
export type ReactivityRequest = z.output<typeof reactivityInputSchema>

// Without explicit reactivities, each halogen uses its light-initiated method's values.
const DEFAULT_METHOD = { Cl: 'cl2-light', Br: 'br2-light' } as const

export function analyzeRequest(input: AnalyzeRequest): AnalyzeResponse {
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
    reactivitySource: input.reactivity
      ? 'values you entered'
      : `${method.name}, ${method.temperatureC} °C (${readerSource(method.source)})`,
    products: predicted.map((p, i) => ({
      label: positionLetter(i),
      smiles: p.smiles,
      hydrogens: p.hydrogens,
      carbonClass: p.carbonClass,
      atoms: p.atoms,
      predictedPercent: p.percent,
      statisticalPercent: (p.hydrogens / totalH) * 100,
      depictionSvg: input.productDepictions
        ? depictSubstrate(p.smiles, { labels: false, width: 150, height: 110, idPrefix: `product-${i}`, kind: 'product' })
        : undefined,
    })),
    depictionSvg: depictSubstrate(input.smiles),
  }
}

export function reactivityRequest(input: ReactivityRequest): ReactivityResponse {
  const analysis = analysisMatching(input.smiles, input.observed.map((o) => o.smiles), input.halogen)
  const result = relativeReactivities(analysis, input.observed, { reference: input.reference })
  return {
    products: result.products.map((p) => ({
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
}

// Chlorination or bromination? The one whose products include every observed SMILES; a
// bromoalkane chlorinated still carries Br, so the SMILES text alone cannot tell.
function analysisMatching(smiles: string, observed: string[], halogen?: Halogen) {
  if (halogen) return analyzeSubstrate(smiles, { halogen })
  const chlorination = analyzeSubstrate(smiles, { halogen: 'Cl' })
  const wanted = observed.map((o) => { try { return canonicalSmiles(o) } catch { return o } })
  const covers = (a: typeof chlorination) => wanted.every((w) => a.products.some((p) => p.smiles === w))
  if (covers(chlorination)) return chlorination
  const bromination = analyzeSubstrate(smiles, { halogen: 'Br' })
  return covers(bromination) ? bromination : chlorination
}
