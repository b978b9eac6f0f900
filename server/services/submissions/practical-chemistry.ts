import type { ExpectationView } from '#shared/types/submission'
import { practicalChemistryOf, type PracticalChemistry } from '#shared/utils/submission'
import { methodReference } from '#shared/utils/source-line'
import { substrateAnalysis, substrateProductNamer, substrateReferenceFor } from '../library'
import { useDb } from '../../utils/db'

/**
 * A practical's products (named), windows, prediction, literature factors and what runs are
 * judged against (the substrate's reference distribution for the method's reagent, if any).
 */
export async function practicalChemistry(practical: { substrateId: number, methodId: number }): Promise<PracticalChemistry> {
  const db = useDb()
  const substrate = await db.selectFrom('substrates').select(['id', 'smiles'])
    .where('id', '=', practical.substrateId).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods')
    .select(['halogen', 'reagent', 'rPrimary', 'rSecondary', 'rTertiary', 'name', 'temperatureC', 'source'])
    .where('id', '=', practical.methodId).executeTakeFirstOrThrow()
  const [windows, nameOf, reference, analysis] = await Promise.all([
    db.selectFrom('substrateWindows').select(['kind', 'productSmiles', 'rtMin', 'rtMax', 'responseFactor'])
      .where('substrateId', '=', substrate.id).execute(),
    substrateProductNamer(db, substrate.id),
    substrateReferenceFor(db, substrate.id, method.reagent),
    substrateAnalysis(substrate.smiles, method.halogen),
  ])
  const chemistry = practicalChemistryOf(substrate.smiles, method, windows, { nameOf, reference, analysis })
  return { ...chemistry, literatureSource: methodReference(method) }
}

/** A product's share in the reference distribution, or null when the practical has none. */
export function referenceShare(chemistry: Pick<PracticalChemistry, 'expected'>, smiles: string): number | null {
  return chemistry.expected.basis === 'reference' ? chemistry.expected.percents.find((m) => m.smiles === smiles)?.percent ?? 0 : null
}

/** The expectation as pages show it. */
export function expectationView(chemistry: Pick<PracticalChemistry, 'expected'>): ExpectationView {
  const { basis, description, percents, factors } = chemistry.expected
  return { basis, description, percents, factors }
}
