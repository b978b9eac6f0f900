import { practicalChemistryOf, type PracticalChemistry } from '#shared/utils/submission'

/** A practical's products, windows, prediction and literature factors, from the database. */
export async function practicalChemistry(practical: { substrateId: number, methodId: number }): Promise<PracticalChemistry> {
  const db = useDb()
  const substrate = await db.selectFrom('substrates').select(['id', 'smiles']).where('id', '=', practical.substrateId).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').select(['halogen', 'rPrimary', 'rSecondary', 'rTertiary']).where('id', '=', practical.methodId).executeTakeFirstOrThrow()
  const windows = await db.selectFrom('substrateWindows').select(['kind', 'productSmiles', 'rtMin', 'rtMax', 'responseFactor']).where('substrateId', '=', substrate.id).execute()
  return practicalChemistryOf(substrate.smiles, method, windows)
}
