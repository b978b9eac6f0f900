import { sql } from 'kysely'
import type { Method, Section, Substrate, SubstrateWindow } from '../../database/schema'
import type { H3Event } from 'h3'
import type { SessionUser } from '#shared/types/auth'
import {
  requirePracticalAccessWith, visibleSectionCondition, type CourseScope, type PracticalScope,
} from '../../utils/access'
import {
  PLANNING_NOTE, type ItemView, type MethodSummary, type PracticalDetail, type PracticalListItem, type ProcedureCardView,
  type ReferenceWindowView, type SessionView, type WindowView,
} from '#shared/types/practical'
import { computeQuantities, expectedProducts, hazardsForReagent } from '#shared/utils/procedure'
import { readerSource } from '#shared/utils/source-line'
import { useDb } from '../../utils/db'
import { substrateAnalysis, substrateDepiction, substrateProductNamer, substrateProductSmiles } from '../library'
import { partnerNames } from '../roster'
import { meetingsOf, sectionRows } from '../sections'

// Reading practicals for the routes under server/api/practicals. Every reader takes
// the caller's scope (from requirePracticalAccess / requireCourseAccess) and puts it in the SQL.

// Pages read the source as a reference (readerSource): our "from memory" notes stay in the library.
export function methodSummary(m: Pick<Method, 'id' | 'name' | 'reagent' | 'halogen' | 'temperatureC' | 'source'>): MethodSummary {
  return { id: m.id, name: m.name, reagent: m.reagent, halogen: m.halogen, temperatureC: m.temperatureC, source: readerSource(m.source) }
}

/** Sessions of some practicals, limited to the sections the caller may see (null: all). */
export async function practicalSessionViews(practicalIds: number[], sectionIds: number[] | null): Promise<Map<number, SessionView[]>> {
  const result = new Map<number, SessionView[]>()
  if (!practicalIds.length || (sectionIds && !sectionIds.length)) return result
  let query = useDb().selectFrom('practicalSessions').selectAll().where('practicalId', 'in', practicalIds)
  if (sectionIds) query = query.where('sectionId', 'in', sectionIds)
  const sessions = await query.orderBy('meetingDate').orderBy('id').execute()
  if (!sessions.length) return result
  const sections = new Map((await sectionRows().where('sections.id', 'in', [...new Set(sessions.map((s) => s.sectionId))]).execute())
    .map((row) => [row.id, { row, meetings: meetingsOf(row) }]))
  for (const s of sessions) {
    const section = sections.get(s.sectionId)!
    const meeting = section.meetings.find((m) => m.date === s.meetingDate)
    const list = result.get(s.practicalId) ?? []
    list.push({
      sectionId: s.sectionId,
      sectionCode: section.row.code,
      meetingDate: s.meetingDate,
      start: meeting?.start ?? null,
      end: meeting?.end ?? null,
      room: section.row.room,
      dueAt: s.dueAt.toISOString(),
    })
    result.set(s.practicalId, list)
  }
  return result
}

export async function practicalItemViews(practicalId: number): Promise<ItemView[]> {
  const rows = await useDb().selectFrom('practicalItems').selectAll().where('practicalId', '=', practicalId).orderBy('position').execute()
  return rows.map((r) => ({ id: r.id, position: r.position, role: r.role, name: r.name, smiles: r.smiles, molarMass: r.molarMass,
    density: r.density, basis: r.basis, amount: r.amount, casNumber: r.casNumber }))
}

type WindowRow = Pick<SubstrateWindow, 'kind' | 'productSmiles' | 'label' | 'rtMin' | 'rtMax' | 'responseFactor'>

/** Product windows of the practical's products (its method's halogen), and the reference windows. */
function windowViews(rows: WindowRow[], products: Set<string>): { windows: WindowView[], referenceWindows: ReferenceWindowView[] } {
  return {
    windows: rows.filter((w) => w.kind === 'product' && w.productSmiles && products.has(w.productSmiles))
      .map((w) => ({ productSmiles: w.productSmiles!, rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor })),
    referenceWindows: rows.filter((w) => w.kind !== 'product')
      .map((w) => ({ kind: w.kind as ReferenceWindowView['kind'], label: w.label, rtMin: w.rtMin, rtMax: w.rtMax })),
  }
}

/**
 * A substrate can carry windows for both its chloro and bromo products; a practical reads only
 * those of its method's halogen.
 */
export async function practicalWindows(substrate: Pick<Substrate, 'id' | 'smiles'>, halogen: 'Cl' | 'Br'): Promise<{ windows: WindowView[]
  referenceWindows: ReferenceWindowView[] }> {
  const rows = await useDb().selectFrom('substrateWindows').selectAll().where('substrateId', '=', substrate.id).orderBy('rtMin').execute()
  return windowViews(rows, await productSmilesOf(substrate.smiles, halogen))
}

async function productSmilesOf(smiles: string, halogen: 'Cl' | 'Br'): Promise<Set<string>> {
  return new Set(await substrateProductSmiles(smiles, halogen))
}

/** A student's due date is their own section's; anyone else sees the latest of those visible. */
export function dueAtFor(scope: Pick<PracticalScope, 'role'>, sessions: SessionView[]): string | null {
  if (!sessions.length) return null
  if (scope.role === 'student') return sessions[0]!.dueAt
  return sessions.map((s) => s.dueAt).sort().at(-1)!
}

interface DetailRow {
  substrate: Pick<Substrate, 'id' | 'name' | 'smiles' | 'molarMass' | 'density'>
  method: Pick<Method, 'id' | 'name' | 'reagent' | 'halogen' | 'temperatureC' | 'source'>
  windows: WindowRow[]
  items: ItemView[]
  sessions: Array<Pick<Section, 'weekday' | 'startTime' | 'endTime' | 'firstDate' | 'lastDate' | 'skippedDates' | 'room'>
  & Pick<SessionView, 'sectionId' | 'sectionCode' | 'meetingDate' | 'dueAt'>>
}

/**
 * Everything a practical's page reads beyond its scope, as one JSON column over the practical
 * `p` (the sessions limited to the sections the caller may see): read with the scope itself
 * (requirePracticalAccessWith) or after it (practicalDetail).
 */
function detailColumns(me: SessionUser) {
  return sql<DetailRow>`json_build_object(
      'substrate', (select json_build_object('id', id, 'name', name, 'smiles', smiles, 'molarMass', molar_mass, 'density', density)
        from substrates where id = p.substrate_id),
      'method', (select json_build_object('id', id, 'name', name, 'reagent', reagent, 'halogen', halogen, 'temperatureC', temperature_c,
          'source', source) from methods where id = p.method_id),
      'windows', coalesce((select json_agg(json_build_object('kind', kind, 'productSmiles', product_smiles, 'label', label,
          'rtMin', rt_min, 'rtMax', rt_max, 'responseFactor', response_factor) order by rt_min, id)
        from substrate_windows where substrate_id = p.substrate_id), '[]'),
      'items', coalesce((select json_agg(json_build_object('id', id, 'position', position, 'role', role, 'name', name, 'smiles', smiles,
          'molarMass', molar_mass, 'density', density, 'basis', basis, 'amount', amount, 'casNumber', cas_number) order by position)
        from practical_items where practical_id = p.id), '[]'),
      'sessions', coalesce((select json_agg(json_build_object('sectionId', s.id, 'sectionCode', s.code, 'meetingDate', ps.meeting_date,
          'dueAt', ps.due_at, 'room', s.room, 'weekday', s.weekday, 'startTime', s.start_time, 'endTime', s.end_time,
          'firstDate', s.first_date, 'lastDate', s.last_date, 'skippedDates', s.skipped_dates) order by ps.meeting_date, ps.id)
        from practical_sessions ps join sections s on s.id = ps.section_id
        where ps.practical_id = p.id and ${visibleSectionCondition(me, 'ps.section_id')}), '[]'))`
}

/** A practical's page for the caller: its scope and everything the page reads, in one statement. */
export async function readPracticalDetail(event: H3Event, practicalId: number): Promise<PracticalDetail> {
  const { scope, columns } = await requirePracticalAccessWith(event, practicalId, detailColumns)
  return practicalDetailOf(scope, columns)
}

/** A practical's page for a scope already read (after a change). */
export async function practicalDetail(scope: PracticalScope): Promise<PracticalDetail> {
  const { rows: [row] } = await sql<{ detail: DetailRow }>`select ${detailColumns(scope.me)} as detail
    from practicals p join courses c on c.id = p.course_id where p.id = ${scope.practical.id}`.execute(useDb())
  if (!row) throw new Error(`practical ${scope.practical.id}: gone`)
  return practicalDetailOf(scope, row.detail)
}

async function practicalDetailOf(scope: PracticalScope, row: DetailRow): Promise<PracticalDetail> {
  const { practical, course } = scope
  if (!row.substrate || !row.method) throw new Error(`practical ${practical.id}: substrate or method missing`)
  const { substrate, method, windows: windowRows, items, sessions: sessionRows } = row
  const sessions = sessionRows.map((s): SessionView => {
    const meeting = meetingsOf({ ...s, timezone: course.timezone }).find((m) => m.date === s.meetingDate)
    return {
      sectionId: s.sectionId, sectionCode: s.sectionCode, meetingDate: s.meetingDate, start: meeting?.start ?? null,
      end: meeting?.end ?? null, room: s.room, dueAt: new Date(s.dueAt).toISOString(),
    }
  })
  const { windows, referenceWindows } = windowViews(windowRows, await productSmilesOf(substrate.smiles, method.halogen))
  return {
    id: practical.id,
    title: practical.title,
    substrate: { name: substrate.name, smiles: substrate.smiles, id: substrate.id, molarMass: substrate.molarMass,
      density: substrate.density },
    method: method.name,
    windows,
    dueAt: dueAtFor(scope, sessions),
    courseId: course.id,
    courseCode: course.code,
    timezone: course.timezone,
    workUnit: practical.workUnit,
    notes: practical.notes,
    methodDetail: methodSummary(method),
    referenceWindows,
    sessions,
    items,
    role: scope.role,
    canManage: scope.role === 'owner',
  }
}

/**
 * The procedure card: for a student their own meeting, station and partner; for staff every
 * session they can see. Quantities are per work unit either way.
 */
export async function procedureCard(scope: PracticalScope): Promise<ProcedureCardView> {
  const db = useDb()
  const { practical, course, me } = scope
  const substrate = await db.selectFrom('substrates').selectAll().where('id', '=', practical.substrateId).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').selectAll().where('id', '=', practical.methodId).executeTakeFirstOrThrow()
  let sessions = (await practicalSessionViews([practical.id], scope.sectionIds)).get(practical.id) ?? []
  const windowRows = await db.selectFrom('substrateWindows').selectAll().where('substrateId', '=', substrate.id).execute()
  const [analysis, depictionSvg] = await Promise.all([
    substrateAnalysis(substrate.smiles, method.halogen),
    substrateDepiction(substrate.smiles, { idPrefix: `card-${practical.id}` }),
  ])
  const { referenceWindows } = await practicalWindows(substrate, method.halogen)
  const items = (await practicalItemViews(practical.id)).map(({ id: _id, position: _p, ...item }) => item)

  let student: ProcedureCardView['student'] = null
  if (scope.role === 'student') {
    const enrollment = await db.selectFrom('enrollments').innerJoin('sections', 'sections.id', 'enrollments.sectionId')
      .select(['enrollments.sectionId', 'enrollments.station', 'enrollments.seat', 'sections.code'])
      .where('enrollments.userId', '=', me.id).where('enrollments.courseId', '=', course.id).where('enrollments.status', '=', 'active')
      .where('enrollments.sectionId', 'in', scope.sessionSectionIds).executeTakeFirstOrThrow()
    const partners = await partnerNames(db, { userId: me.id, sectionId: enrollment.sectionId, station: enrollment.station })
    sessions = sessions.filter((s) => s.sectionId === enrollment.sectionId)
    student = { name: me.name, sectionCode: enrollment.code, station: enrollment.station, seat: enrollment.seat, partners }
  }

  return {
    practical: { id: practical.id, title: practical.title, workUnit: practical.workUnit, notes: practical.notes },
    course: { id: course.id, code: course.code, title: course.title, timezone: course.timezone },
    audience: student ? 'student' : 'staff',
    student,
    sessions,
    substrate: { name: substrate.name, smiles: substrate.smiles, molarMass: substrate.molarMass, density: substrate.density },
    method: methodSummary(method),
    quantities: computeQuantities(items),
    products: expectedProducts(substrate.smiles, method, windowRows, await substrateProductNamer(db, substrate.id), analysis),
    referenceWindows,
    dueAt: dueAtFor(scope, sessions),
    hazards: hazardsForReagent(method.reagent),
    planningNote: PLANNING_NOTE,
    depictionSvg,
  }
}

/**
 * A course's practicals, first meeting first. TAs and students see only practicals that run in
 * their sections, and only those sections' ids and dates; the section filter is part of the query.
 */
export async function coursePracticals(scope: Pick<CourseScope, 'course' | 'sectionIds'>): Promise<PracticalListItem[]> {
  const id = scope.course.id
  let query = useDb().selectFrom('practicals')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .select(['practicals.id', 'practicals.title', 'practicals.workUnit', 'substrates.name as substrateName',
      'substrates.smiles as substrateSmiles', 'methods.name as method', 'methods.reagent as methodReagent'])
    .where('practicals.courseId', '=', id)
  if (scope.sectionIds) {
    const sectionIds = scope.sectionIds
    query = query.where((eb) => eb.exists(eb.selectFrom('practicalSessions').select('practicalSessions.id')
      .whereRef('practicalSessions.practicalId', '=', 'practicals.id').where('practicalSessions.sectionId', 'in', sectionIds)))
  }
  const rows = await query.orderBy('practicals.id').execute()
  const sessions = await practicalSessionViews(rows.map((r) => r.id), scope.sectionIds)
  const firstMeeting = (practicalId: number) => sessions.get(practicalId)?.[0]?.meetingDate ?? '9999-12-31'
  return rows
    .map((r) => {
      const mine = sessions.get(r.id) ?? []
      return {
        id: r.id,
        title: r.title,
        substrateSmiles: r.substrateSmiles,
        method: r.method,
        sectionIds: mine.map((s) => s.sectionId),
        meetingDates: mine.map((s) => s.meetingDate),
        substrateName: r.substrateName,
        methodReagent: r.methodReagent,
        workUnit: r.workUnit,
        timezone: scope.course.timezone,
        sessions: mine,
      }
    })
    .sort((a, b) => firstMeeting(a.id).localeCompare(firstMeeting(b.id)) || a.id - b.id)
}
