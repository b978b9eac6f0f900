import type { ExpectationView } from '#shared/types/submission'
import { sql, type RawBuilder } from 'kysely'
import { practicalChemistryOf, type PracticalChemistry, type ReferenceDistribution } from '#shared/utils/submission'
import { methodReference } from '#shared/utils/source-line'
import { builtInProductName } from '#shared/data/product-names'
import type { Method, SubstrateWindow } from '../../database/schema'
import { substrateAnalysis, type ProductNamer } from '../library'
import { useDb } from '../../utils/db'

type ChemistryMethod = Pick<Method, 'halogen' | 'reagent' | 'rPrimary' | 'rSecondary' | 'rTertiary' | 'name' | 'temperatureC' | 'source'>

export interface ChemistryRow {
  substrate: { id: number, smiles: string }
  method: ChemistryMethod
  windows: Array<Pick<SubstrateWindow, 'kind' | 'productSmiles' | 'rtMin' | 'rtMax' | 'responseFactor'>>
  names: Array<{ productSmiles: string, name: string }>
  reference: ReferenceDistribution | null
}

// An id sent with the statement, or a column of the statement around (`p.substrate_id`).
type IdOrColumn = number | RawBuilder<number>

/** The substrate, method, windows, stored product names and reference distribution, as one JSON object. */
export const chemistryRowJson = (substrateId: IdOrColumn, methodId: IdOrColumn) => sql<ChemistryRow>`json_build_object(
    'substrate', (select json_build_object('id', id, 'smiles', smiles) from substrates where id = ${substrateId}),
    'method', (select json_build_object('halogen', halogen, 'reagent', reagent, 'rPrimary', r_primary, 'rSecondary', r_secondary,
        'rTertiary', r_tertiary, 'name', name, 'temperatureC', temperature_c, 'source', source)
      from methods where id = ${methodId}),
    'windows', coalesce((select json_agg(json_build_object('kind', kind, 'productSmiles', product_smiles, 'rtMin', rt_min, 'rtMax', rt_max,
        'responseFactor', response_factor) order by id)
      from substrate_windows where substrate_id = ${substrateId}), '[]'),
    'names', coalesce((select json_agg(json_build_object('productSmiles', product_smiles, 'name', name) order by product_smiles)
      from substrate_product_names where substrate_id = ${substrateId}), '[]'),
    'reference', (select json_build_object('percents', r.percents, 'source', r.source, 'sourceKind', r.source_kind)
      from substrate_references r join methods m on m.id = ${methodId} and r.reagent::text = m.reagent::text
      where r.substrate_id = ${substrateId}))`

/** The chemistry row of a practical, in one query. */
async function chemistryRow(practical: { substrateId: number, methodId: number }): Promise<ChemistryRow> {
  const { rows: [row] } = await sql<{ chemistry: ChemistryRow }>`select
    ${chemistryRowJson(practical.substrateId, practical.methodId)} as chemistry`.execute(useDb())
  return row!.chemistry
}

/**
 * A practical's products (named), windows, prediction, literature factors and what runs are
 * judged against (the substrate's reference distribution for the method's reagent, if any).
 */
export async function practicalChemistry(practical: { substrateId: number, methodId: number }): Promise<PracticalChemistry> {
  // A copy: the remembered answer is shared by every later caller.
  return structuredClone(await sharedChemistryOf(await chemistryRow(practical)))
}

/**
 * The chemistry of a row already read (chemistryRowJson, e.g. with the scope), as remembered and
 * shared by every caller: read it, never change it (practicalChemistry gives a copy).
 */
export function sharedChemistryOf(row: ChemistryRow): Promise<Readonly<PracticalChemistry>> {
  if (!row.substrate || !row.method) throw new Error('practical chemistry: substrate or method missing')
  const key = JSON.stringify([row.substrate.smiles, row.method, row.windows, row.names, row.reference])
  let known = chemistryMemo.get(key)
  if (!known) {
    known = chemistryOf(row)
    if (chemistryMemo.size >= CHEMISTRY_MEMO_LIMIT) chemistryMemo.delete(chemistryMemo.keys().next().value!)
    chemistryMemo.set(key, known)
    known.catch(() => chemistryMemo.delete(key))
  }
  return known
}

// Matching a reference distribution to the products parses SMILES with openchemlib: several
// milliseconds on every summary, queue and review page. The answer depends only on the row
// read above (and the substrate's analysis, itself a function of its SMILES), so it is kept per
// row: an edit to the substrate, method, windows, names or reference makes a new key.
const CHEMISTRY_MEMO_LIMIT = 500
const chemistryMemo = new Map<string, Promise<PracticalChemistry>>()

async function chemistryOf({ substrate, method, windows, names, reference }: ChemistryRow): Promise<PracticalChemistry> {
  const own = new Map(names.map((n) => [n.productSmiles, n.name]))
  const nameOf: ProductNamer = (smiles) => own.get(smiles) ?? builtInProductName(smiles)
  const analysis = await substrateAnalysis(substrate.smiles, method.halogen)
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
