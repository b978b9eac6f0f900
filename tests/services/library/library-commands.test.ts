import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRows, instructorWithCourse, sharedMethod, stubNitroGlobals } from '../arrange'
import {
  copyMethod, deleteLibraryEntry, saveSubstrateWindows, setSubstrateReference, updateMethod, updateSubstrate,
} from '../../../server/services/library/library-commands'
import { createPractical } from '../../../server/services/practicals/practical-commands'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

// Butane (CCCC) and its two monochlorination products; isobutane (CC(C)C) as the new structure.
// Molar masses from IUPAC standard atomic weights: C4H10 58.12 g/mol.
const identifyIsobutane = async () => ({ smiles: 'CC(C)C', formula: 'C4H10', molarMass: 58.12 })

async function ownButane() {
  const world = await instructorWithCourse()
  const substrate = await testDb().insertInto('substrates')
    .values({ name: 'my butane', smiles: 'CCCC', formula: 'C4H10', molarMass: 58.12, ownerId: world.me.id })
    .returningAll().executeTakeFirstOrThrow()
  await saveSubstrateWindows(testDb(), world.actor, substrate.id, [
    { kind: 'product', productSmiles: 'CCCCCl', label: 'A', rtMin: 3.1, rtMax: 3.4, responseFactor: 1 },
    { kind: 'product', productSmiles: 'CCC(C)Cl', label: 'B', rtMin: 2.6, rtMax: 2.9, responseFactor: 1 },
    { kind: 'solvent', productSmiles: null, label: 'solvent', rtMin: 1.0, rtMax: 1.3, responseFactor: 1 },
  ], [{ productSmiles: 'CCCCCl', name: 'n-butyl chloride' }])
  return { ...world, substrate }
}

const windowsOf = (substrateId: number) => testDb().selectFrom('substrateWindows').select(['kind', 'productSmiles'])
  .where('substrateId', '=', substrateId).orderBy('rtMin').execute()

describe('updateSubstrate', () => {
  it('a new structure drops the product windows, names and references of the old one, keeping the solvent window', async () => {
    const { substrate, actor } = await ownButane()
    await setSubstrateReference(testDb(), actor, substrate.id, 'cl2-light',
      [{ smiles: 'CCCCCl', percent: 28 }, { smiles: 'CCC(C)Cl', percent: 72 }], { source: 'common practice', sourceKind: 'from-memory' })
    await updateSubstrate(testDb(), actor, substrate, { smiles: 'CC(C)C' }, identifyIsobutane)
    expect(await windowsOf(substrate.id)).toEqual([{ kind: 'solvent', productSmiles: null }])
    expect(await testDb().selectFrom('substrateProductNames').select('name').where('substrateId', '=', substrate.id).execute()).toEqual([])
    expect(await testDb().selectFrom('substrateReferences').select('reagent').where('substrateId', '=', substrate.id).execute()).toEqual([])
    const [row] = await auditRows('substrate.update', substrate.id)
    expect((row!.after as { droppedWindows: unknown[] }).droppedWindows).toHaveLength(2)
  })

  it('refuses a new structure while a practical uses the substrate, changing nothing', async () => {
    const { substrate, actor, me, course } = await ownButane()
    const method = await sharedMethod('cl2-light')
    await createPractical(testDb(), actor, me, course.id,
      { title: 'Uses it', substrateId: substrate.id, methodId: method.id, workUnit: 'pair', notes: '' })
    await expect(updateSubstrate(testDb(), actor, substrate, { smiles: 'CC(C)C' },
      identifyIsobutane)).rejects.toMatchObject({ statusCode: 409 })
    expect(await windowsOf(substrate.id)).toHaveLength(3)
    const stored = await testDb().selectFrom('substrates').select('smiles').where('id', '=', substrate.id).executeTakeFirstOrThrow()
    expect(stored.smiles).toBe('CCCC')
    await expect(deleteLibraryEntry(testDb(), actor, 'substrates', substrate.id, substrate)).rejects.toMatchObject({ statusCode: 409 })
    expect(await auditRows('substrate.delete', substrate.id)).toEqual([])
  })
})

describe('methods', () => {
  it('a copy is the caller\'s own; changing its reagent changes its halogen', async () => {
    const { actor, me } = await instructorWithCourse()
    const shared = await sharedMethod('cl2-light')
    const copy = await copyMethod(testDb(), actor, me.id, shared)
    expect(copy).toMatchObject({ ownerId: me.id, reagent: 'cl2-light', halogen: 'Cl' })
    expect(copy.name.endsWith('(copy)')).toBe(true)
    const updated = await updateMethod(testDb(), actor, copy, { reagent: 'nbs' })
    expect(updated).toMatchObject({ reagent: 'nbs', halogen: 'Br' })
    const [row] = await auditRows('method.update', copy.id)
    expect((row!.before as { reagent: string }).reagent).toBe('cl2-light')
  })
})
