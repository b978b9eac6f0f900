import { sql, type Kysely } from 'kysely'
import { hash } from 'node:crypto'
import { createError } from 'h3'
import type { Database, Section } from '../../database/schema'
import type { Reagent } from '../../database/schema-stockroom'
import type { SessionUser } from '#shared/types/auth'
import type { HazardKey } from '#shared/data/cautions'
import { STOCK_PLANNING_NOTE, WASTE_RULE, type ForecastAnswer, type UnlinkedItem } from '#shared/types/stockroom'
import {
  buildForecast, workUnitsOf, type ForecastItem, type ForecastLot, type ForecastPractical, type ForecastReagent, type ForecastSessionInput,
} from '#shared/utils/forecast'
import { visibleCourseIdQuery } from '../../utils/access'
import { textOnceCompiled } from '../../utils/db'
import { jsonBytes, type JsonBytes } from '../../utils/json-text'
import { sizedMemo } from '../../engines/memo'
import { canonicalForms } from '../library'
import { meetingsOf } from '../sections'
import { stockroomToday } from './lots'
import { DEFAULT_RINSE_ML_PER_UNIT } from './settings'

// What the forecast engine (shared/utils/forecast.ts) is run on: the schedule, enrolment, the
// practicals' items, the catalog and the stock, read for the caller's courses in one query.

type CatalogReagent = Pick<Reagent, 'id' | 'name' | 'smiles' | 'unit' | 'containerSize' | 'overagePercent' | 'molarMass' | 'density'
  | 'physicalState' | 'supplierName' | 'hazards' | 'casNumber'>

type ItemRow = ForecastItem & { dismissed: number[] }

type ForecastMeetingRow = Pick<Section, 'weekday' | 'startTime' | 'endTime' | 'firstDate' | 'lastDate' | 'skippedDates'
  | 'studentsPerStation'> & Pick<ForecastSessionInput, 'practicalId' | 'sectionId' | 'sectionCode' | 'meetingDate'> & {
    timezone: string
    stations: Array<number | null>
  }

interface ForecastInputs {
  rinseMlPerUnit: number | null
  reagents: CatalogReagent[]
  /** Meetings in range with their section's timetable and the stations of its active students. */
  sessions: ForecastMeetingRow[]
  practicals: Array<Omit<ForecastPractical, 'items'> & { items: ItemRow[] }>
  lots: ForecastLot[]
}

type InputsShape = `${SessionUser['role']} ${'all' | 'one'}`

/** The caller's courses: every one they may see, or the one asked for (none when they may not see it). */
const chosenCourses = (shape: InputsShape, userId: number, courseId: number | null) => {
  const [role, which] = shape.split(' ') as [SessionUser['role'], 'all' | 'one']
  const visible = visibleCourseIdQuery({ id: userId, role, name: '' })
  return which === 'all' ? sql`select id from (${visible}) v` : sql`select id from (${visible}) v where id = ${courseId}`
}

/**
 * Everything the forecast is run on, in one query, as the JSON text PostgreSQL wrote (null when
 * a course was asked for that the caller may not see): the caller's courses (all for the
 * coordinator, owned for an instructor, or the one asked for) and their meetings from one date to
 * another, the practicals with their items (and the links the coordinator dismissed), the
 * catalog, the stock that remains per lot and the rinse setting. Compiled once per role and
 * whether a course was asked for, prepared once per connection (textOnceCompiled, server/utils/db.ts).
 */
const readForecastInputs = textOnceCompiled((_db, shape: InputsShape, userId: number, courseId: number | null, from: string, to: string) =>
  sql<{ text: string | null }>`with chosen as (${chosenCourses(shape, userId, courseId)}),
      meetings as (select ps.practical_id, ps.section_id, ps.meeting_date from practical_sessions ps
        join practicals p on p.id = ps.practical_id
        where p.course_id in (select id from chosen) and ps.meeting_date >= ${from}::date and ps.meeting_date <= ${to}::date)
    select case when ${sql.lit(shape.endsWith('all'))} or exists (select 1 from chosen) then json_build_object(
      'rinseMlPerUnit', (select rinse_ml_per_unit from stockroom_settings where id = 1),
      'reagents', coalesce((select json_agg(json_build_object('id', id, 'name', name, 'smiles', smiles, 'unit', unit,
          'containerSize', container_size, 'overagePercent', overage_percent, 'molarMass', molar_mass, 'density', density,
          'physicalState', physical_state, 'supplierName', supplier_name, 'hazards', hazards, 'casNumber', cas_number) order by id) from reagents), '[]'),
      'sessions', coalesce((select json_agg(json_build_object('practicalId', m.practical_id, 'sectionId', s.id, 'sectionCode', s.code,
          'meetingDate', m.meeting_date, 'weekday', s.weekday, 'startTime', s.start_time, 'endTime', s.end_time,
          'firstDate', s.first_date, 'lastDate', s.last_date, 'skippedDates', s.skipped_dates,
          'studentsPerStation', s.students_per_station, 'timezone', c.timezone,
          'stations', array(select e.station from enrollments e where e.section_id = s.id and e.status = 'active'))
          order by m.meeting_date, m.section_id, m.practical_id)
        from meetings m join sections s on s.id = m.section_id join courses c on c.id = s.course_id), '[]'),
      'practicals', coalesce((select json_agg(json_build_object('id', p.id, 'title', p.title, 'courseId', p.course_id, 'courseCode', c.code,
          'workUnit', p.work_unit, 'items', coalesce((select json_agg(json_build_object('id', i.id, 'role', i.role, 'name', i.name,
              'smiles', i.smiles, 'molarMass', i.molar_mass, 'density', i.density, 'basis', i.basis, 'amount', i.amount,
              'reagentId', i.reagent_id, 'solutionPercentWv', i.solution_percent_wv, 'casNumber', i.cas_number,
              'dismissed', array(select d.reagent_id from item_link_dismissals d where d.practical_item_id = i.id))
            order by i.position) from practical_items i where i.practical_id = p.id), '[]')) order by p.id)
        from practicals p join courses c on c.id = p.course_id where p.id in (select practical_id from meetings)), '[]'),
      'lots', coalesce((select json_agg(json_build_object('id', l.id, 'reagentId', l.reagent_id, 'unit', l.unit, 'expiresOn', l.expires_on,
          'remaining', l.quantity - coalesce((select sum(u.amount) from reagent_usage u where u.lot_id = l.id), 0)) order by l.id)
        from reagent_lots l), '[]'))::text end as text`)

/** The forecast's inputs as text (see readForecastInputs); 404 when a course was asked for that the caller may not see. */
async function forecastInputsText(
  db: Kysely<Database>, me: SessionUser, courseId: number | undefined, from: string, to: string,
): Promise<string> {
  const one = courseId !== undefined
  const text = await readForecastInputs(db, `${me.role} ${one ? 'one' : 'all'}`, me.id, courseId ?? null, from, to)
  if (text === null) throw createError({ statusCode: 404, statusMessage: 'Course not found' })
  return text
}

/** Each meeting with whether the section still meets that day and its work units. */
function forecastSessions(inputs: ForecastInputs): ForecastSessionInput[] {
  const workUnitOf = new Map(inputs.practicals.map((p) => [p.id, p.workUnit]))
  return inputs.sessions.map((s) => {
    const students = s.stations.map((station) => ({ station }))
    return {
      practicalId: s.practicalId, sectionId: s.sectionId, sectionCode: s.sectionCode, meetingDate: s.meetingDate,
      isMeeting: meetingsOf(s).some((m) => m.date === s.meetingDate), students: students.length,
      units: workUnitsOf(students, workUnitOf.get(s.practicalId) ?? 'pair', s.studentsPerStation),
    }
  })
}

const forecastReagentOf = (r: CatalogReagent): ForecastReagent => ({
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
  item: { name: string, casNumber?: string | null }, canonical: string | null, reagents: CatalogReagent[],
): { reagent: CatalogReagent, because: NonNullable<UnlinkedItem['suggestedBecause']> } | null {
  const byStructure = canonical ? reagents.find((r) => r.smiles === canonical) : undefined
  if (byStructure) return { reagent: byStructure, because: 'structure' }
  const byCas = item.casNumber ? reagents.find((r) => r.casNumber === item.casNumber) : undefined
  if (byCas) return { reagent: byCas, because: 'cas' }
  const byName = reagents.find((r) => normalName(r.name) === normalName(item.name))
  return byName ? { reagent: byName, because: 'name' } : null
}

/** Items of the range's practicals that draw on no reagent yet, each with the reagent it probably means. */
async function unlinkedItemsOf(
  practicals: ForecastInputs['practicals'], inRange: Set<number>, reagents: CatalogReagent[],
): Promise<UnlinkedItem[]> {
  const unlinked = practicals.filter((p) => inRange.has(p.id))
    .flatMap((p) => p.items.filter((i) => i.reagentId === null).map((i) => ({ p, i })))
  const structures = await canonicalForms(unlinked.flatMap(({ i }) => (i.smiles ? [i.smiles] : [])))
  let next = 0
  return unlinked.map(({ p, i }) => {
    const refused = new Set(i.dismissed)
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

/** The forecast of `request` from its inputs: a function of the inputs' text, `today` and the range alone. */
async function runForecast(inputsText: string, request: ForecastRequest, today: string): Promise<ForecastAnswer> {
  const inputs = JSON.parse(inputsText) as ForecastInputs
  const rinseMlPerUnit = inputs.rinseMlPerUnit ?? DEFAULT_RINSE_ML_PER_UNIT
  const practicals = inputs.practicals.map((p) => ({ ...p, items: p.items.map(({ dismissed: _d, ...item }) => item) }))
  const result = buildForecast({
    today, from: request.from, to: request.to, reagents: inputs.reagents.map(forecastReagentOf), practicals,
    sessions: forecastSessions(inputs), lots: inputs.lots, rinseMlPerUnit,
  })
  const inRange = new Set(result.sessions.map((s) => s.practicalId))
  return {
    ...result,
    from: request.from,
    to: request.to,
    unlinkedItems: await unlinkedItemsOf(inputs.practicals, inRange, inputs.reagents),
    rinseMlPerUnit,
    wasteRule: WASTE_RULE,
    planningNote: STOCK_PLANNING_NOTE,
  }
}

// Meetings between today and the range draw on stock first, so the read starts at the earlier.
const readStart = (request: ForecastRequest, today: string) => (today < request.from ? today : request.from)

/** Loads the schedule, enrolment, items, catalog and stock behind a forecast, and runs it. */
export async function loadForecast(db: Kysely<Database>, me: SessionUser, request: ForecastRequest): Promise<ForecastAnswer> {
  const today = request.today ?? stockroomToday()
  return runForecast(await forecastInputsText(db, me, request.courseId, readStart(request, today), request.to), request, today)
}

// The last 32 answers written as JSON, by the digest of the inputs' text and the dates.
const rememberAnswer = sizedMemo(32)

/**
 * The forecast as the JSON the route sends. The inputs are read for the caller on every request
 * (so the scope is checked each time and any edit is seen); running the engine on them, which
 * cost more than the read, is remembered per process by the digest of the inputs' text with
 * `today` and the range: the answer is made of nothing else, so an edit is a new key, never a
 * stale answer, and two callers share an answer only when they read the same inputs.
 */
export async function forecastJson(db: Kysely<Database>, me: SessionUser, request: ForecastRequest): Promise<JsonBytes> {
  const today = request.today ?? stockroomToday()
  const text = await forecastInputsText(db, me, request.courseId, readStart(request, today), request.to)
  const key = `${today} ${request.from} ${request.to} ${hash('sha256', text, 'base64url')}`
  return rememberAnswer(key, 1, () => runForecast(text, request, today)
    .then((answer) => jsonBytes(Buffer.from(JSON.stringify(answer)))))
}
