import type { Kysely } from 'kysely'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { Reagent } from '../../database/schema-stockroom'
import type { SessionUser } from '#shared/types/auth'
import type { HazardKey } from '#shared/data/cautions'
import { STOCK_PLANNING_NOTE, WASTE_RULE, type ForecastAnswer, type UnlinkedItem } from '#shared/types/stockroom'
import {
  buildForecast, workUnitsOf, type ForecastItem, type ForecastLot, type ForecastPractical, type ForecastReagent, type ForecastSessionInput,
} from '#shared/utils/forecast'
import { visibleCourseIds } from '../../utils/access'
import { canonicalForms } from '../library'
import { meetingsOf, sectionRows } from '../sections'
import { lotRows, stockroomToday } from './lots'
import { stockroomSettings } from './settings'

// What the forecast engine (shared/utils/forecast.ts) is run on: the schedule, enrolment, the
// practicals' items, the catalog and the stock, read for the caller's courses.

/** Course ids whose practicals the caller's forecast covers: all for the coordinator, owned for an instructor. */
async function forecastCourseIds(me: SessionUser, courseId?: number): Promise<number[]> {
  const visible = await visibleCourseIds(me)
  if (courseId === undefined) return visible
  if (!visible.includes(courseId)) throw createError({ statusCode: 404, statusMessage: 'Course not found' })
  return [courseId]
}

type SessionRow = { practicalId: number, sectionId: number, meetingDate: string }

/** The practicals' meetings in the courses from one date to another. */
async function scheduledSessions(db: Kysely<Database>, courseIds: number[], from: string, to: string): Promise<SessionRow[]> {
  if (!courseIds.length) return []
  return db.selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
    .select(['practicalSessions.practicalId', 'practicalSessions.sectionId', 'practicalSessions.meetingDate'])
    .where('practicals.courseId', 'in', courseIds)
    .where('practicalSessions.meetingDate', '>=', from).where('practicalSessions.meetingDate', '<=', to)
    .execute()
}

/** The practicals with their items, as the engine takes them. */
async function forecastPracticals(db: Kysely<Database>, practicalIds: number[]): Promise<ForecastPractical[]> {
  if (!practicalIds.length) return []
  const practicalRows = await db.selectFrom('practicals').innerJoin('courses', 'courses.id', 'practicals.courseId')
    .select(['practicals.id', 'practicals.title', 'practicals.courseId', 'practicals.workUnit', 'courses.code as courseCode'])
    .where('practicals.id', 'in', practicalIds).execute()
  const itemRows = await db.selectFrom('practicalItems').selectAll().where('practicalId', 'in', practicalIds)
    .orderBy('practicalId').orderBy('position').execute()
  return practicalRows.map((p) => ({
    id: p.id, title: p.title, courseId: p.courseId, courseCode: p.courseCode, workUnit: p.workUnit,
    items: itemRows.filter((i) => i.practicalId === p.id).map((i): ForecastItem => ({
      id: i.id, role: i.role, name: i.name, smiles: i.smiles, molarMass: i.molarMass, density: i.density, basis: i.basis, amount: i.amount,
      reagentId: i.reagentId, solutionPercentWv: i.solutionPercentWv, casNumber: i.casNumber,
    })),
  }))
}

/** Each meeting with its section, whether the section still meets that day, and its work units. */
async function forecastSessions(
  db: Kysely<Database>, rows: SessionRow[], practicals: ForecastPractical[],
): Promise<ForecastSessionInput[]> {
  const sectionIds = [...new Set(rows.map((s) => s.sectionId))]
  if (!sectionIds.length) return []
  const sections = new Map((await sectionRows().where('sections.id', 'in', sectionIds).execute())
    .map((row) => [row.id, { row, dates: new Set(meetingsOf(row).map((m) => m.date)) }]))
  const enrolled = await db.selectFrom('enrollments').select(['sectionId', 'station'])
    .where('sectionId', 'in', sectionIds).where('status', '=', 'active').execute()
  const workUnitOf = new Map(practicals.map((p) => [p.id, p.workUnit]))
  return rows.map((s) => {
    const section = sections.get(s.sectionId)!
    const students = enrolled.filter((e) => e.sectionId === s.sectionId)
    return {
      practicalId: s.practicalId, sectionId: s.sectionId, sectionCode: section.row.code, meetingDate: s.meetingDate,
      isMeeting: section.dates.has(s.meetingDate), students: students.length,
      units: workUnitsOf(students, workUnitOf.get(s.practicalId) ?? 'pair', section.row.studentsPerStation),
    }
  })
}

const forecastReagentOf = (r: Reagent): ForecastReagent => ({
  id: r.id, name: r.name, unit: r.unit, containerSize: r.containerSize, overagePercent: r.overagePercent, molarMass: r.molarMass,
  density: r.density, physicalState: r.physicalState, supplierName: r.supplierName, hazards: r.hazards as HazardKey[],
})

const normalName = (name: string) => name.trim().toLowerCase().replace(/^(anhydrous|aqueous)\s+/, '').replace(/\s*\(.*\)$/, '')

/**
 * A catalog reagent an unlinked item probably means: the same structure (`canonical`, null when
 * none), else the same CAS Registry Number, else the same name; never one the coordinator
 * dismissed for this item.
 */
function suggestReagent(
  item: { name: string, casNumber?: string | null }, canonical: string | null, reagents: Reagent[],
): { reagent: Reagent, because: NonNullable<UnlinkedItem['suggestedBecause']> } | null {
  const byStructure = canonical ? reagents.find((r) => r.smiles === canonical) : undefined
  if (byStructure) return { reagent: byStructure, because: 'structure' }
  const byCas = item.casNumber ? reagents.find((r) => r.casNumber === item.casNumber) : undefined
  if (byCas) return { reagent: byCas, because: 'cas' }
  const byName = reagents.find((r) => normalName(r.name) === normalName(item.name))
  return byName ? { reagent: byName, because: 'name' } : null
}

/** Items of the range's practicals that draw on no reagent yet, each with the reagent it probably means. */
async function unlinkedItemsOf(
  db: Kysely<Database>, practicals: ForecastPractical[], inRange: Set<number>, reagents: Reagent[],
): Promise<UnlinkedItem[]> {
  const unlinked = practicals.filter((p) => inRange.has(p.id))
    .flatMap((p) => p.items.filter((i) => i.reagentId === null).map((i) => ({ p, i })))
  const structures = await canonicalForms(unlinked.flatMap(({ i }) => (i.smiles ? [i.smiles] : [])))
  const dismissed = unlinked.length
    ? await db.selectFrom('itemLinkDismissals').select(['practicalItemId', 'reagentId'])
        .where('practicalItemId', 'in', unlinked.map(({ i }) => i.id)).execute()
    : []
  let next = 0
  return unlinked.map(({ p, i }) => {
    const refused = new Set(dismissed.filter((d) => d.practicalItemId === i.id).map((d) => d.reagentId))
    const suggestion = suggestReagent(i, i.smiles ? structures[next++] ?? null : null, reagents.filter((r) => !refused.has(r.id)))
    return {
      practicalItemId: i.id, practicalId: p.id, practicalTitle: p.title, courseCode: p.courseCode, role: i.role, name: i.name,
      basis: i.basis, casNumber: i.casNumber ?? null,
      suggestedReagentId: suggestion?.reagent.id ?? null, suggestedReagentName: suggestion?.reagent.name ?? null,
      suggestedBecause: suggestion?.because ?? null,
    }
  })
}

export interface ForecastRequest {
  from: string
  to: string
  courseId?: number
  today?: string
}

/** Loads the schedule, enrolment, items, catalog and stock behind a forecast, and runs it. */
export async function loadForecast(db: Kysely<Database>, me: SessionUser, request: ForecastRequest): Promise<ForecastAnswer> {
  const today = request.today ?? stockroomToday()
  const courseIds = await forecastCourseIds(me, request.courseId)
  const settings = await stockroomSettings(db)
  const reagents = await db.selectFrom('reagents').selectAll().execute()
  // Meetings between today and the range draw on stock first.
  const sessionRows = await scheduledSessions(db, courseIds, today < request.from ? today : request.from, request.to)
  const practicals = await forecastPracticals(db, [...new Set(sessionRows.map((s) => s.practicalId))])
  const sessions = await forecastSessions(db, sessionRows, practicals)
  const lots: ForecastLot[] = (await lotRows(db).execute())
    .map((l) => ({ id: l.id, reagentId: l.reagentId, remaining: Number(l.remaining), unit: l.unit, expiresOn: l.expiresOn }))
  const result = buildForecast({
    today, from: request.from, to: request.to, reagents: reagents.map(forecastReagentOf), practicals, sessions, lots,
    rinseMlPerUnit: settings.rinseMlPerUnit,
  })
  const inRange = new Set(result.sessions.map((s) => s.practicalId))
  return {
    ...result,
    from: request.from,
    to: request.to,
    unlinkedItems: await unlinkedItemsOf(db, practicals, inRange, reagents),
    rinseMlPerUnit: settings.rinseMlPerUnit,
    wasteRule: WASTE_RULE,
    planningNote: STOCK_PLANNING_NOTE,
  }
}
