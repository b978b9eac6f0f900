import type { SeedContext } from './context'
import type { MethodReagent } from '../schema'
// Seed files run outside Nitro: engine code comes in by relative path.
import { HALOGENATION_METHODS } from '../../../shared/data/halogenation-methods'
import { TEACHING_SUBSTRATES } from '../../../shared/data/teaching-substrates'
import { SEEDED_REFERENCES } from '../../../shared/data/reference-distributions'
import { analyzeSubstrate, canonicalSmiles, molarMassOf } from '../../../shared/utils/halogenation'
import { positionLetter } from '../../../shared/utils/depiction'

interface DemoWindow {
  /** Any spelling; stored canonical. */
  product?: string
  kind: 'product' | 'solvent' | 'starting-material'
  label?: string
  rtMin: number
  rtMax: number
}

const SOLVENT: DemoWindow = { kind: 'solvent', label: 'dichloromethane', rtMin: 1.2, rtMax: 1.6 }

// Invented demo values on an invented demo GC column (no real instrument or method): they only
// keep a sensible order. Dichloromethane (the demo's GC solvent) first, the starting material
// next, then the products by boiling point. Response factors are all 1 (isomeric chloroalkanes
// respond alike on an FID, per the effective-carbon-number concept).
const DEMO_WINDOWS: Record<string, DemoWindow[]> = {
  '1-chlorobutane': [
    SOLVENT,
    { kind: 'starting-material', label: '1-chlorobutane', rtMin: 2.1, rtMax: 2.45 },
    { kind: 'product', product: 'CCCC(Cl)Cl', rtMin: 3.3, rtMax: 3.55 }, // 1,1-dichlorobutane
    { kind: 'product', product: 'CCC(Cl)CCl', rtMin: 3.8, rtMax: 4.05 }, // 1,2-dichlorobutane
    { kind: 'product', product: 'CC(Cl)CCCl', rtMin: 4.4, rtMax: 4.65 }, // 1,3-dichlorobutane
    { kind: 'product', product: 'ClCCCCCl', rtMin: 5.6, rtMax: 5.85 }, // 1,4-dichlorobutane
  ],
  '2,3-dimethylbutane': [
    SOLVENT,
    { kind: 'starting-material', label: '2,3-dimethylbutane', rtMin: 1.8, rtMax: 2.05 },
    { kind: 'product', product: 'CC(C)C(C)(C)Cl', rtMin: 3.0, rtMax: 3.25 }, // 2-chloro-2,3-dimethylbutane
    { kind: 'product', product: 'CC(C)C(C)CCl', rtMin: 3.5, rtMax: 3.75 }, // 1-chloro-2,3-dimethylbutane
  ],
}

/** The shared library: the four methods and the teaching substrates, none owned by anyone. */
export async function seedLibrary(ctx: SeedContext): Promise<void> {
  for (const method of HALOGENATION_METHODS) {
    const reagent: MethodReagent = method.reagent
    const row = await ctx.db.insertInto('methods').values({
      name: method.name,
      reagent,
      halogen: method.halogen,
      temperatureC: method.temperatureC,
      rPrimary: method.reactivity.primary,
      rSecondary: method.reactivity.secondary,
      rTertiary: method.reactivity.tertiary,
      source: method.source,
      notes: method.note,
      ownerId: null,
    }).returning('id').executeTakeFirstOrThrow()
    ctx.ids.methods.set(reagent, row.id)
  }

  for (const substrate of TEACHING_SUBSTRATES) {
    const analysis = analyzeSubstrate(substrate.smiles)
    const row = await ctx.db.insertInto('substrates').values({
      name: substrate.name,
      smiles: analysis.canonicalSmiles,
      formula: analysis.formula,
      molarMass: molarMassOf(substrate.smiles).molarMass,
      density: substrate.density,
      boilingPointC: substrate.boilingPointC,
      source: substrate.source,
      notes: '',
      ownerId: null,
    }).returning('id').executeTakeFirstOrThrow()
    ctx.ids.substrates.set(substrate.name, row.id)

    await seedReferences(ctx, substrate.id, row.id)
    const windows = DEMO_WINDOWS[substrate.name] ?? []
    const products = new Set(analysis.products.map((p) => p.smiles))
    const letters = new Map(analysis.products.map((p, i) => [p.smiles, positionLetter(i)]))
    if (windows.length) {
      const covered = new Set(windows.map((w) => w.product && canonicalSmiles(w.product)))
      const missing = [...products].filter((p) => !covered.has(p))
      if (missing.length) throw new Error(`seed: ${substrate.name} has no window for ${missing.join(', ')}`)
      await ctx.db.insertInto('substrateWindows').values(windows.map((w) => {
        const productSmiles = w.product ? canonicalSmiles(w.product) : null
        // A typo here would leave a demo product without a window: fail the seed instead.
        if (productSmiles && !products.has(productSmiles)) throw new Error(`seed: ${w.product} is not a product of ${substrate.name}`)
        return {
          substrateId: row.id,
          kind: w.kind,
          productSmiles,
          label: productSmiles ? letters.get(productSmiles)! : w.label ?? w.kind,
          rtMin: w.rtMin,
          rtMax: w.rtMax,
          responseFactor: 1,
        }
      })).execute()
    }
  }
}

/** The shared library's reference distributions, product SMILES stored canonical. */
async function seedReferences(ctx: SeedContext, teachingId: string, substrateId: number) {
  for (const ref of SEEDED_REFERENCES.filter((r) => r.substrate === teachingId)) {
    const halogen = HALOGENATION_METHODS.find((m) => m.reagent === ref.reagent)!.halogen
    const substrateSmiles = TEACHING_SUBSTRATES.find((s) => s.id === teachingId)!.smiles
    const products = new Set(analyzeSubstrate(substrateSmiles, { halogen }).products.map((p) => p.smiles))
    const percents = ref.percents.map((p) => ({ smiles: canonicalSmiles(p.smiles), percent: p.percent }))
    // A typo would silently count a product as 0 %: fail the seed instead.
    const stray = percents.find((p) => !products.has(p.smiles))
    if (stray || percents.length !== products.size) {
      throw new Error(`seed: the reference for ${teachingId} does not cover its products exactly`)
    }
    await ctx.db.insertInto('substrateReferences').values({
      substrateId,
      reagent: ref.reagent,
      percents: JSON.stringify(percents),
      source: ref.source,
      sourceKind: ref.sourceKind,
      updatedBy: null,
    }).execute()
  }
}
