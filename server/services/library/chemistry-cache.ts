import type { Halogen, SubstrateAnalysis } from '#shared/utils/halogenation'
import type { DepictOptions } from '#shared/utils/depiction'
import { memoizeAsync } from '../../engines/memo'
import type { ReagentForm } from '../../engines/tasks'
import { runEngine } from '../../utils/engines'

// Stored substrates are analysed and drawn again on many pages; the answers never change for a
// SMILES, so each is computed once in the engine worker and kept (a few hundred, least recently
// used dropped first).
const analyses = memoizeAsync(500,
  ({ smiles, halogen }: { smiles: string, halogen: Halogen }) => runEngine('substrateAnalysis', { smiles, halogen }))
const drawings = memoizeAsync(500, (item: { smiles: string, options: DepictOptions }) => runEngine('depictions', [item])
  .then(([svg]) => svg!))
const canonical = memoizeAsync(2000, (smiles: string) => runEngine('canonicalForms', [smiles]).then(([form]) => form ?? null))

/** The monohalogenation products of a substrate (an engine error for one that cannot be analysed). */
export async function substrateAnalysis(smiles: string, halogen: Halogen = 'Cl'): Promise<SubstrateAnalysis> {
  // A copy: the remembered answer is shared by every later caller.
  return structuredClone(await analyses({ smiles, halogen }))
}

/** The SMILES of a substrate's products, from the remembered analysis without copying all of it. */
export async function substrateProductSmiles(smiles: string, halogen: Halogen): Promise<string[]> {
  return (await analyses({ smiles, halogen })).products.map((p) => p.smiles)
}

/** The substrate drawn with its positions lettered (see shared/utils/depiction.ts). */
export function substrateDepiction(smiles: string, options: DepictOptions = {}): Promise<string> {
  return drawings({ smiles, options })
}

/** Canonical SMILES of each, null where one cannot be read; the unknown ones in one engine task. */
export async function canonicalForms(smiles: readonly string[]): Promise<Array<string | null>> {
  const unknown = [...new Set(smiles.filter((s) => !canonical.has(s)))]
  if (unknown.length > 1) {
    const forms = await runEngine('canonicalForms', unknown)
    unknown.forEach((s, i) => canonical.set(s, Promise.resolve(forms[i] ?? null)))
  }
  return Promise.all(smiles.map((s) => canonical(s)))
}

/** Canonical SMILES, formula and molar mass of each reagent SMILES, null where one cannot be read. */
export function reagentForms(smiles: readonly string[]): Promise<Array<ReagentForm | null>> {
  return smiles.length ? runEngine('reagentForms', [...smiles], { field: 'smiles' }) : Promise.resolve([])
}
