import { sql, type Kysely } from 'kysely'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { Reagent } from '../../database/schema-stockroom'
import type { SessionUser } from '#shared/types/auth'
import type { HazardKey } from '#shared/data/cautions'
import type { ReagentDetail, ReagentFields, ReagentListItem } from '#shared/types/stockroom'
import { visibleCourseIds } from '../../utils/access'
import { reagentForms } from '../library'
import { invalid } from '../../utils/validation'
import { isLowStock, lotRows, lotView, stockroomToday, stockTotals } from './lots'

// The reagent catalog: what the routes read, and the rules a reagent's fields keep.

export function reagentFields(r: Reagent): ReagentFields {
  return {
    name: r.name, smiles: r.smiles, casNumber: r.casNumber, formula: r.formula, molarMass: r.molarMass, physicalState: r.physicalState,
    density: r.density,
    containerSize: r.containerSize, unit: r.unit, supplierName: r.supplierName, supplierEmail: r.supplierEmail,
    catalogNumber: r.catalogNumber,
    signalWord: r.signalWord, hazardCodes: r.hazardCodes, hazards: r.hazards as HazardKey[], storageNotes: r.storageNotes,
    shelfLifeMonths: r.shelfLifeMonths, overagePercent: r.overagePercent, lowStockLevel: r.lowStockLevel,
  }
}

/**
 * A SMILES, when given, decides the formula and molar mass (IUPAC standard atomic weights) and
 * is stored canonical; without one the typed formula and molar mass stand.
 */
export async function reagentIdentity(input: { smiles?: string | null, formula?: string, molarMass?: number | null }) {
  if (!input.smiles) return { smiles: null, formula: input.formula ?? '', molarMass: input.molarMass ?? null }
  const [form] = await reagentForms([input.smiles])
  if (!form) invalid([{ field: 'smiles', message: 'Not a readable SMILES' }])
  return { smiles: form.smiles, formula: form.formula, molarMass: Number(form.molarMass.toFixed(3)) }
}

export async function reagentListItems(db: Kysely<Database>, today = stockroomToday()): Promise<ReagentListItem[]> {
  const reagents = await db.selectFrom('reagents').selectAll().orderBy('name').execute()
  const lots = (await lotRows(db).execute()).map((row) => ({ reagentId: row.reagentId, view: lotView(row, today) }))
  return reagents.map((r) => {
    const own = lots.filter((l) => l.reagentId === r.id).map((l) => l.view)
    const open = own.filter((l) => l.remaining > 0)
    const totals = stockTotals(own)
    const expiries = open.filter((l) => l.expiresOn).map((l) => l.expiresOn!).sort()
    return {
      id: r.id, name: r.name, formula: r.formula, physicalState: r.physicalState, unit: r.unit, containerSize: r.containerSize,
      supplierName: r.supplierName, signalWord: r.signalWord, hazardCodes: r.hazardCodes, hazards: r.hazards as HazardKey[],
      ...totals, lowStockLevel: r.lowStockLevel, low: isLowStock(totals.inDate, r.lowStockLevel), lots: open.length,
      nextExpiry: expiries[0] ?? null,
    }
  })
}

export async function requireReagent(db: Kysely<Database>, id: number): Promise<Reagent> {
  const row = await db.selectFrom('reagents').selectAll().where('id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Reagent not found' })
  return row
}

/** The last 200 uses of a reagent's lots, newest first. */
function usageOf(db: Kysely<Database>, lotIds: number[]) {
  return db.selectFrom('reagentUsage')
    .leftJoin('practicals', 'practicals.id', 'reagentUsage.practicalId')
    .leftJoin('users', 'users.id', 'reagentUsage.recordedBy')
    .select([
      'reagentUsage.id', 'reagentUsage.lotId', 'reagentUsage.usedOn', 'reagentUsage.amount', 'reagentUsage.note',
      'practicals.title as practicalTitle', 'users.name as recordedBy',
    ])
    .where('reagentUsage.lotId', 'in', lotIds)
    .orderBy('reagentUsage.usedOn', 'desc').orderBy('reagentUsage.id', 'desc').limit(200).execute()
}

/** Items of the caller's courses' practicals that draw on a reagent. */
function linkedItemsOf(db: Kysely<Database>, reagentId: number, courseIds: number[]) {
  return db.selectFrom('practicalItems')
    .innerJoin('practicals', 'practicals.id', 'practicalItems.practicalId')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .select([
      'practicalItems.id', 'practicalItems.practicalId', 'practicalItems.role', 'practicalItems.name', 'practicalItems.solutionPercentWv',
      'practicals.title', 'courses.code',
    ])
    .where('practicalItems.reagentId', '=', reagentId).where('practicals.courseId', 'in', courseIds)
    .orderBy('practicals.title').orderBy('practicalItems.position').execute()
}

export async function reagentDetailView(
  db: Kysely<Database>, r: Reagent, me: SessionUser, today = stockroomToday(),
): Promise<ReagentDetail> {
  const lots = (await lotRows(db).where('reagentLots.reagentId', '=', r.id)
    .orderBy('reagentLots.receivedOn', 'desc').orderBy('reagentLots.id', 'desc').execute())
    .map((row) => lotView(row, today))
  const usage = lots.length ? await usageOf(db, lots.map((l) => l.id)) : []
  const lotById = new Map(lots.map((l) => [l.id, l]))
  const courseIds = await visibleCourseIds(me)
  const linked = courseIds.length ? await linkedItemsOf(db, r.id, courseIds) : []
  const totals = stockTotals(lots)
  return {
    id: r.id,
    ...reagentFields(r),
    ...totals,
    low: isLowStock(totals.inDate, r.lowStockLevel),
    lots,
    usage: usage.map((u) => ({
      id: u.id, lotId: u.lotId, lotCode: lotById.get(u.lotId)?.lotCode ?? '', usedOn: u.usedOn, amount: u.amount,
      unit: lotById.get(u.lotId)?.unit ?? r.unit, note: u.note, practicalTitle: u.practicalTitle, recordedBy: u.recordedBy,
    })),
    linkedItems: linked.map((i) => ({
      practicalItemId: i.id, practicalId: i.practicalId, practicalTitle: i.title, courseCode: i.code, role: i.role, name: i.name,
      percentWv: i.solutionPercentWv,
    })),
    canManage: me.role === 'coordinator',
  }
}

/** Names are unique in the catalog (case aside), so a line or a link never means two things. */
export async function refuseDuplicateReagentName(db: Kysely<Database>, name: string) {
  const row = await db.selectFrom('reagents').select('id').where(sql<boolean>`lower(name) = lower(${name})`).executeTakeFirst()
  if (row) invalid([{ field: 'name', message: 'The catalog already has a reagent of this name' }], 409)
}

/** A quantity in the reagent's own unit; g ↔ mL goes through its density, or is refused. */
export function stockQuantityIn(reagent: Pick<Reagent, 'unit' | 'density'>, quantity: number, unit: 'g' | 'mL'): number {
  if (unit === reagent.unit) return quantity
  if (!reagent.density) {
    invalid([{ field: 'unit', message: `This reagent is counted in ${reagent.unit}; without a density ${unit} cannot be converted` }])
  }
  return Math.round((unit === 'g' ? quantity / reagent.density : quantity * reagent.density) * 1000) / 1000
}
