import type { H3Event } from 'h3'
import { sql } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import type { HazardKey } from '#shared/data/cautions'
import {
  STOCK_PLANNING_NOTE, WASTE_RULE,
  type ForecastAnswer, type LotView, type ReagentDetail, type ReagentFields, type ReagentListItem, type StockroomSettings, type UnlinkedItem,
} from '#shared/types/stockroom'
import { buildForecast, workUnitsOf, type ForecastItem, type ForecastLot, type ForecastPractical, type ForecastReagent, type ForecastSessionInput } from '#shared/utils/forecast'
import type { Reagent } from '../database/schema-stockroom'
import { todayIn } from '#shared/utils/dates'
import { canonicalForms, reagentForms } from '../services/library'
import { meetingsOf, sectionRows } from '../services/sections'

// The stockroom: who may use it, and the reads behind its routes. Coordinators manage all of
// it; instructors read the catalog and the forecast of their own courses; TAs and students
// have no business here (403 on every route).

export function requireStockroomManager(event: H3Event) {
  return requireRole(event, 'coordinator')
}

export function requireStockroomReader(event: H3Event) {
  return requireRole(event, 'coordinator', 'instructor')
}

/** The stockroom's calendar day (UTC): lots expire and meetings fall on calendar dates. */
export function stockroomToday(now = new Date()): string {
  return todayIn('UTC', now)
}

export function reagentFields(r: Reagent): ReagentFields {
  return {
    name: r.name, smiles: r.smiles, formula: r.formula, molarMass: r.molarMass, physicalState: r.physicalState, density: r.density,
    containerSize: r.containerSize, unit: r.unit, supplierName: r.supplierName, supplierEmail: r.supplierEmail, catalogNumber: r.catalogNumber,
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

/** Lots with what is left of each (received quantity less the usage recorded against it). */
export function lotRows() {
  return useDb().selectFrom('reagentLots').selectAll('reagentLots')
    .select(sql<number>`reagent_lots.quantity - coalesce((select sum(u.amount) from reagent_usage u where u.lot_id = reagent_lots.id), 0)`.as('remaining'))
    .select((eb) => eb.selectFrom('orderLines').select('orderLines.orderId').whereRef('orderLines.id', '=', 'reagentLots.orderLineId').as('orderId'))
}

type LotRow = Awaited<ReturnType<ReturnType<typeof lotRows>['execute']>>[number]

export function lotView(row: LotRow, today: string): LotView {
  return {
    id: row.id, lotCode: row.lotCode, quantity: row.quantity, remaining: Number(row.remaining), unit: row.unit, containers: row.containers,
    location: row.location, receivedOn: row.receivedOn, openedOn: row.openedOn, expiresOn: row.expiresOn,
    expired: row.expiresOn !== null && row.expiresOn < today, orderId: row.orderId ?? null,
  }
}

/** In-date and expired stock of a reagent, from its lots, in the reagent's unit. */
export function stockTotals(lots: LotView[]) {
  const inDate = lots.filter((l) => !l.expired).reduce((s, l) => s + Math.max(0, l.remaining), 0)
  const expired = lots.filter((l) => l.expired).reduce((s, l) => s + Math.max(0, l.remaining), 0)
  return { inDate: Math.round(inDate * 1000) / 1000, expired: Math.round(expired * 1000) / 1000 }
}

export const isLowStock = (inDate: number, level: number | null) => level !== null && inDate < level

export async function reagentListItems(today = stockroomToday()): Promise<ReagentListItem[]> {
  const reagents = await useDb().selectFrom('reagents').selectAll().orderBy('name').execute()
  const lots = (await lotRows().execute()).map((row) => ({ reagentId: row.reagentId, view: lotView(row, today) }))
  return reagents.map((r) => {
    const own = lots.filter((l) => l.reagentId === r.id).map((l) => l.view)
    const open = own.filter((l) => l.remaining > 0)
    const totals = stockTotals(own)
    const expiries = open.filter((l) => l.expiresOn).map((l) => l.expiresOn!).sort()
    return {
      id: r.id, name: r.name, formula: r.formula, physicalState: r.physicalState, unit: r.unit, containerSize: r.containerSize,
      supplierName: r.supplierName, signalWord: r.signalWord, hazardCodes: r.hazardCodes, hazards: r.hazards as HazardKey[],
      ...totals, lowStockLevel: r.lowStockLevel, low: isLowStock(totals.inDate, r.lowStockLevel), lots: open.length, nextExpiry: expiries[0] ?? null,
    }
  })
}

export async function requireReagent(id: number): Promise<Reagent> {
  const row = await useDb().selectFrom('reagents').selectAll().where('id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Reagent not found' })
  return row
}

export async function stockroomSettings(): Promise<StockroomSettings> {
  const row = await useDb().selectFrom('stockroomSettings').select(['rinseMlPerUnit', 'deliverTo']).where('id', '=', 1).executeTakeFirst()
  return { rinseMlPerUnit: row?.rinseMlPerUnit ?? 10, deliverTo: row?.deliverTo ?? '' }
}

/** Course ids whose practicals the caller's forecast covers: all for the coordinator, owned for an instructor. */
async function forecastCourseIds(me: SessionUser, courseId?: number): Promise<number[]> {
  const visible = await visibleCourseIds(me)
  if (courseId === undefined) return visible
  if (!visible.includes(courseId)) throw createError({ statusCode: 404, statusMessage: 'Course not found' })
  return [courseId]
}

const normalName = (name: string) => name.trim().toLowerCase().replace(/^(anhydrous|aqueous)\s+/, '').replace(/\s*\(.*\)$/, '')

/** A catalog reagent an unlinked item probably means: the same structure (`canonical`, null when none), else the same name. */
function suggestReagent(item: { name: string }, canonical: string | null, reagents: Reagent[]): Reagent | null {
  return (canonical ? reagents.find((r) => r.smiles === canonical) : undefined)
    ?? reagents.find((r) => normalName(r.name) === normalName(item.name))
    ?? null
}

export interface ForecastRequest {
  from: string
  to: string
  courseId?: number
  today?: string
}

/** Loads the schedule, enrolment, items, catalog and stock behind a forecast, and runs it. */
export async function loadForecast(me: SessionUser, request: ForecastRequest): Promise<ForecastAnswer> {
  const db = useDb()
  const today = request.today ?? stockroomToday()
  const courseIds = await forecastCourseIds(me, request.courseId)
  const settings = await stockroomSettings()
  const reagents = await db.selectFrom('reagents').selectAll().execute()
  const earliest = today < request.from ? today : request.from
  const sessionRows = courseIds.length
    ? await db.selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
      .select(['practicalSessions.practicalId', 'practicalSessions.sectionId', 'practicalSessions.meetingDate'])
      .where('practicals.courseId', 'in', courseIds)
      .where('practicalSessions.meetingDate', '>=', earliest).where('practicalSessions.meetingDate', '<=', request.to)
      .execute()
    : []

  const practicalIds = [...new Set(sessionRows.map((s) => s.practicalId))]
  const sectionIds = [...new Set(sessionRows.map((s) => s.sectionId))]
  const practicalRows = practicalIds.length
    ? await db.selectFrom('practicals').innerJoin('courses', 'courses.id', 'practicals.courseId')
      .select(['practicals.id', 'practicals.title', 'practicals.courseId', 'practicals.workUnit', 'courses.code as courseCode'])
      .where('practicals.id', 'in', practicalIds).execute()
    : []
  const itemRows = practicalIds.length
    ? await db.selectFrom('practicalItems').selectAll().where('practicalId', 'in', practicalIds).orderBy('practicalId').orderBy('position').execute()
    : []
  const sections = new Map((sectionIds.length ? await sectionRows().where('sections.id', 'in', sectionIds).execute() : [])
    .map((row) => [row.id, { row, dates: new Set(meetingsOf(row).map((m) => m.date)) }]))
  const enrolled = sectionIds.length
    ? await db.selectFrom('enrollments').select(['sectionId', 'station']).where('sectionId', 'in', sectionIds).where('status', '=', 'active').execute()
    : []

  const practicals: ForecastPractical[] = practicalRows.map((p) => ({
    id: p.id, title: p.title, courseId: p.courseId, courseCode: p.courseCode, workUnit: p.workUnit,
    items: itemRows.filter((i) => i.practicalId === p.id).map((i): ForecastItem => ({
      id: i.id, role: i.role, name: i.name, smiles: i.smiles, molarMass: i.molarMass, density: i.density, basis: i.basis, amount: i.amount,
      reagentId: i.reagentId, reagentGramsPerMl: i.reagentGramsPerMl,
    })),
  }))
  const workUnitOf = new Map(practicals.map((p) => [p.id, p.workUnit]))
  const sessions: ForecastSessionInput[] = sessionRows.map((s) => {
    const section = sections.get(s.sectionId)!
    const students = enrolled.filter((e) => e.sectionId === s.sectionId)
    return {
      practicalId: s.practicalId, sectionId: s.sectionId, sectionCode: section.row.code, meetingDate: s.meetingDate,
      isMeeting: section.dates.has(s.meetingDate), students: students.length,
      units: workUnitsOf(students, workUnitOf.get(s.practicalId) ?? 'pair', section.row.studentsPerStation),
    }
  })
  const lots: ForecastLot[] = (await lotRows().execute()).map((l) => ({ id: l.id, reagentId: l.reagentId, remaining: Number(l.remaining), unit: l.unit, expiresOn: l.expiresOn }))
  const forecastReagents: ForecastReagent[] = reagents.map((r) => ({
    id: r.id, name: r.name, unit: r.unit, containerSize: r.containerSize, overagePercent: r.overagePercent, molarMass: r.molarMass,
    density: r.density, physicalState: r.physicalState, supplierName: r.supplierName, hazards: r.hazards as HazardKey[],
  }))

  const result = buildForecast({ today, from: request.from, to: request.to, reagents: forecastReagents, practicals, sessions, lots, rinseMlPerUnit: settings.rinseMlPerUnit })
  const inRange = new Set(result.sessions.map((s) => s.practicalId))
  const unlinked = practicals.filter((p) => inRange.has(p.id)).flatMap((p) => p.items.filter((i) => i.reagentId === null).map((i) => ({ p, i })))
  const structures = await canonicalForms(unlinked.flatMap(({ i }) => (i.smiles ? [i.smiles] : [])))
  let next = 0
  const unlinkedItems: UnlinkedItem[] = unlinked.map(({ p, i }) => {
    const suggestion = suggestReagent(i, i.smiles ? structures[next++] ?? null : null, reagents)
    return {
      practicalItemId: i.id, practicalId: p.id, practicalTitle: p.title, courseCode: p.courseCode, role: i.role, name: i.name,
      suggestedReagentId: suggestion?.id ?? null, suggestedReagentName: suggestion?.name ?? null,
    }
  })
  return {
    ...result,
    from: request.from,
    to: request.to,
    unlinkedItems,
    rinseMlPerUnit: settings.rinseMlPerUnit,
    wasteRule: WASTE_RULE,
    planningNote: STOCK_PLANNING_NOTE,
  }
}

export async function reagentDetailView(r: Reagent, me: SessionUser, today = stockroomToday()): Promise<ReagentDetail> {
  const db = useDb()
  const lots = (await lotRows().where('reagentLots.reagentId', '=', r.id).orderBy('reagentLots.receivedOn', 'desc').orderBy('reagentLots.id', 'desc').execute())
    .map((row) => lotView(row, today))
  const usage = lots.length
    ? await db.selectFrom('reagentUsage')
      .leftJoin('practicals', 'practicals.id', 'reagentUsage.practicalId')
      .leftJoin('users', 'users.id', 'reagentUsage.recordedBy')
      .select(['reagentUsage.id', 'reagentUsage.lotId', 'reagentUsage.usedOn', 'reagentUsage.amount', 'reagentUsage.note', 'practicals.title as practicalTitle', 'users.name as recordedBy'])
      .where('reagentUsage.lotId', 'in', lots.map((l) => l.id))
      .orderBy('reagentUsage.usedOn', 'desc').orderBy('reagentUsage.id', 'desc').limit(200).execute()
    : []
  const lotById = new Map(lots.map((l) => [l.id, l]))
  const courseIds = await visibleCourseIds(me)
  const linked = courseIds.length
    ? await db.selectFrom('practicalItems').innerJoin('practicals', 'practicals.id', 'practicalItems.practicalId').innerJoin('courses', 'courses.id', 'practicals.courseId')
      .select(['practicalItems.id', 'practicalItems.practicalId', 'practicalItems.role', 'practicalItems.name', 'practicalItems.reagentGramsPerMl', 'practicals.title', 'courses.code'])
      .where('practicalItems.reagentId', '=', r.id).where('practicals.courseId', 'in', courseIds)
      .orderBy('practicals.title').orderBy('practicalItems.position').execute()
    : []
  const totals = stockTotals(lots)
  return {
    id: r.id,
    ...reagentFields(r),
    ...totals,
    low: isLowStock(totals.inDate, r.lowStockLevel),
    lots,
    usage: usage.map((u) => ({
      id: u.id, lotId: u.lotId, lotCode: lotById.get(u.lotId)?.lotCode ?? '', usedOn: u.usedOn, amount: u.amount, unit: lotById.get(u.lotId)?.unit ?? r.unit,
      note: u.note, practicalTitle: u.practicalTitle, recordedBy: u.recordedBy,
    })),
    linkedItems: linked.map((i) => ({ practicalItemId: i.id, practicalId: i.practicalId, practicalTitle: i.title, courseCode: i.code, role: i.role, name: i.name, gramsPerMl: i.reagentGramsPerMl })),
    canManage: me.role === 'coordinator',
  }
}

/** A lot with what is left of it, or 404. */
export async function requireLot(id: number, today = stockroomToday()) {
  const row = await lotRows().where('reagentLots.id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Lot not found' })
  return { row, view: lotView(row, today) }
}

/** Names are unique in the catalog (case aside), so a line or a link never means two things. */
export async function refuseDuplicateReagentName(name: string) {
  const row = await useDb().selectFrom('reagents').select('id').where(sql<boolean>`lower(name) = lower(${name})`).executeTakeFirst()
  if (row) invalid([{ field: 'name', message: 'The catalog already has a reagent of this name' }], 409)
}

/** A quantity in the reagent's own unit; g ↔ mL goes through its density, or is refused. */
export function stockQuantityIn(reagent: Pick<Reagent, 'unit' | 'density'>, quantity: number, unit: 'g' | 'mL'): number {
  if (unit === reagent.unit) return quantity
  if (!reagent.density) invalid([{ field: 'unit', message: `This reagent is counted in ${reagent.unit}; without a density ${unit} cannot be converted` }])
  return Math.round((unit === 'g' ? quantity / reagent.density : quantity * reagent.density) * 1000) / 1000
}
