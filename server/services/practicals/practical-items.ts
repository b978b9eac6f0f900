import type { Kysely, Transaction } from 'kysely'
import type { Database, Method, Substrate } from '../../database/schema'
import type { ItemInput } from '#shared/types/practical'
import { defaultItems, type ItemSpec } from '#shared/utils/procedure'
import { invalid } from '../../utils/validation'
import { reagentForms } from '../library'

// A practical's per-unit scale (practical_items) and the library entries it is built from.

type Db = Kysely<Database> | Transaction<Database>

/** The shared library (no owner) and the instructor's own entries are theirs to use. */
async function libraryEntry<T extends 'substrates' | 'methods'>(db: Db, table: T, id: number, me: { id: number }) {
  const row = await db.selectFrom(table as 'substrates').selectAll()
    .where('id', '=', id)
    .where((eb) => eb.or([eb('ownerId', 'is', null), eb('ownerId', '=', me.id)]))
    .executeTakeFirst()
  return row as (T extends 'substrates' ? Substrate : Method) | undefined
}

export async function requireLibraryChoice(db: Db, me: { id: number }, choice: { substrateId?: number, methodId?: number }) {
  const substrate = choice.substrateId === undefined ? undefined : await libraryEntry(db, 'substrates', choice.substrateId, me)
  if (choice.substrateId !== undefined && !substrate) invalid([{ field: 'substrateId', message: 'Pick a substrate from your library' }])
  const method = choice.methodId === undefined ? undefined : await libraryEntry(db, 'methods', choice.methodId, me)
  if (choice.methodId !== undefined && !method) invalid([{ field: 'methodId', message: 'Pick a method from your library' }])
  return { substrate, method }
}

export function prefilledItems(substrate: Substrate, method: Pick<Method, 'reagent'>): ItemSpec[] {
  const items = defaultItems({ name: substrate.name, smiles: substrate.smiles, molarMass: substrate.molarMass, density: substrate.density },
    method.reagent)
  // The substrate's CAS number travels with its item, for the stockroom's link proposal.
  return items.map((item) => (item.role === 'substrate' ? { ...item, casNumber: substrate.casNumber } : item))
}

/**
 * Items as they will be stored: a SMILES must parse (it is stored as typed), and a missing
 * molar mass comes from it (IUPAC standard atomic weights via openchemlib, in the engine worker).
 */
export async function checkedItems(
  items: Array<ItemInput & { smiles: string | null, molarMass: number | null, density: number | null }>,
): Promise<ItemSpec[]> {
  const forms = await reagentForms(items.flatMap((item) => (item.smiles ? [item.smiles] : [])))
  let next = 0
  return items.map((item, i) => {
    let molarMass = item.molarMass
    if (item.smiles) {
      const form = forms[next++]
      if (!form) invalid([{ field: `items.${i}.smiles`, message: 'Not a readable SMILES' }])
      molarMass ??= Number(form.molarMass.toFixed(3))
    }
    return { role: item.role, name: item.name, smiles: item.smiles, molarMass, density: item.density, basis: item.basis,
      amount: item.amount, casNumber: item.casNumber ?? null }
  })
}

/**
 * Replaces a practical's items. The stockroom's link of each item to a catalog reagent is kept
 * across the edit, matched by role and name, so an instructor's change does not undo it.
 */
export async function replacePracticalItems(trx: Transaction<Database>, practicalId: number, items: ItemSpec[]) {
  const before = await trx.selectFrom('practicalItems').select(['role', 'name', 'reagentId', 'solutionPercentWv'])
    .where('practicalId', '=', practicalId).execute()
  const key = (i: { role: string, name: string }) => `${i.role}|${i.name.trim().toLowerCase()}`
  const links = new Map(before.filter((b) => b.reagentId !== null).map((b) => [key(b), b]))
  await trx.deleteFrom('practicalItems').where('practicalId', '=', practicalId).execute()
  if (!items.length) return
  await trx.insertInto('practicalItems').values(items.map((item, position) => {
    const link = links.get(key(item))
    return { practicalId, position, ...item, reagentId: link?.reagentId ?? null, solutionPercentWv: link?.solutionPercentWv ?? null }
  })).execute()
}

export async function touchPractical(trx: Transaction<Database>, practicalId: number) {
  await trx.updateTable('practicals').set({ updatedAt: new Date() }).where('id', '=', practicalId).execute()
}
