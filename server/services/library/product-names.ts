import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import type { ReferenceReagent } from '../../database/schema-library'
import type { ReferenceDistribution } from '../../../shared/utils/submission'
import { builtInProductName } from '../../../shared/data/product-names'

// What a substrate's products are called and its reference distributions, read for the engines.
// Relative imports and an explicit database: the demo seed runs this outside Nitro too.

export type ProductNamer = (canonicalSmiles: string) => string | null

/** The instructor's own names of a substrate's products, by canonical SMILES. */
export async function storedProductNames(db: Kysely<Database>, substrateIds: readonly number[]): Promise<Map<number, Map<string, string>>> {
  const byId = new Map<number, Map<string, string>>()
  if (!substrateIds.length) return byId
  const rows = await db.selectFrom('substrateProductNames').select(['substrateId', 'productSmiles', 'name'])
    .where('substrateId', 'in', [...substrateIds]).execute()
  for (const r of rows) byId.set(r.substrateId, (byId.get(r.substrateId) ?? new Map()).set(r.productSmiles, r.name))
  return byId
}

/** Display names of a substrate's products: the instructor's own name where one is stored, else the built-in IUPAC name. */
export async function substrateProductNamer(db: Kysely<Database>, substrateId: number): Promise<ProductNamer> {
  const own = (await storedProductNames(db, [substrateId])).get(substrateId) ?? new Map<string, string>()
  return (smiles) => own.get(smiles) ?? builtInProductName(smiles)
}

/** The substrate's reference distribution for a reagent family, or null. */
export async function substrateReferenceFor(db: Kysely<Database>, substrateId: number,
  reagent: ReferenceReagent): Promise<ReferenceDistribution | null> {
  const row = await db.selectFrom('substrateReferences').select(['percents', 'source', 'sourceKind'])
    .where('substrateId', '=', substrateId).where('reagent', '=', reagent).executeTakeFirst()
  return row ? { percents: row.percents, source: row.source, sourceKind: row.sourceKind } : null
}
