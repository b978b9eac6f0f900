import { sql, type Kysely, type Transaction } from 'kysely'
import { findConflicts, sectionMeetings, type Conflict, type Meeting, type ScheduledSection } from '#shared/utils/schedule'
import type { SectionView } from '#shared/types/section'
import type { Database, Section } from '../../database/schema'
import { useDb } from '../../utils/db'

interface SectionRow extends Section {
  courseCode: string
  timezone: string
  taIds: number[]
  enrolled: number
}

/** Sections with their course's code and zone, TA ids and active enrolment, in one query. */
export function sectionRows(db: Kysely<Database> | Transaction<Database> = useDb()) {
  return db
    .selectFrom('sections')
    .innerJoin('courses', 'courses.id', 'sections.courseId')
    .selectAll('sections')
    .select([
      'courses.code as courseCode',
      'courses.timezone',
      sql<number[]>`coalesce((select array_agg(st.user_id order by st.user_id) from section_tas st
        where st.section_id = sections.id), '{}')`.as('taIds'),
      sql<number>`(select count(*)::int from enrollments e where e.section_id = sections.id and e.status = 'active')`.as('enrolled'),
    ])
    .orderBy('sections.weekday')
    .orderBy('sections.startTime')
    .orderBy('sections.code')
}

// A section's meetings are worked out from its timetable with date-fns in its zone: about a
// millisecond for a term, paid on every page that lists sessions. The same timetable always
// gives the same meetings, so each is kept (frozen: callers share it) for the process's life.
const MEETING_MEMO_LIMIT = 5000
const meetingMemo = new Map<string, Meeting[]>()

export function meetingsOf(row: Pick<SectionRow,
  'weekday' | 'startTime' | 'endTime' | 'firstDate' | 'lastDate' | 'skippedDates' | 'timezone'>): Meeting[] {
  const key = [row.weekday, row.startTime, row.endTime, row.firstDate, row.lastDate, row.timezone, ...row.skippedDates].join('|')
  const known = meetingMemo.get(key)
  if (known) return known
  const meetings = Object.freeze(sectionMeetings({
    weekday: row.weekday,
    startTime: row.startTime,
    endTime: row.endTime,
    firstDate: row.firstDate,
    lastDate: row.lastDate,
    skippedDates: row.skippedDates,
    timezone: row.timezone,
  }).map((m) => Object.freeze(m))) as Meeting[]
  if (meetingMemo.size >= MEETING_MEMO_LIMIT) meetingMemo.delete(meetingMemo.keys().next().value!)
  meetingMemo.set(key, meetings)
  return meetings
}

function scheduled(row: SectionRow): ScheduledSection {
  return {
    sectionId: row.id,
    label: `${row.courseCode} ${row.code}`,
    room: row.room,
    taIds: row.taIds,
    meetings: meetingsOf(row),
    enrolled: row.enrolled,
    hoodStations: row.hoodStations,
    studentsPerStation: row.studentsPerStation,
  }
}

async function taNames(db: Kysely<Database>, ids: number[]) {
  if (!ids.length) return {}
  const rows = await db.selectFrom('users').select(['id', 'name']).where('id', 'in', ids).execute()
  return Object.fromEntries(rows.map((r) => [r.id, r.name]))
}

/**
 * Conflicts across every course on campus (a TA or a room is shared beyond one course),
 * keeping those that involve the given sections. `candidate` replaces a stored section, or
 * is a new one (id 0), so a save can be checked before it is written.
 */
export async function conflictsFor(sectionIds: number[], candidate?: SectionRow, db: Kysely<Database> = useDb()): Promise<Conflict[]> {
  const rows = (await sectionRows(db).execute()) as SectionRow[]
  const all = rows.filter((r) => r.id !== candidate?.id)
  if (candidate) all.push(candidate)
  const entries = all.map(scheduled)
  const focus = new Set(candidate ? [...sectionIds, candidate.id] : sectionIds)
  const names = await taNames(db, [...new Set(all.flatMap((r) => r.taIds))])
  return findConflicts(entries, names).filter((c) => c.sectionIds.some((id) => focus.has(id)))
}

/** Conflicts that sections not yet written (say, a course's copy in a new term) would bring; give them ids below 0. */
export async function conflictsOfNewSections(candidates: SectionRow[], db: Kysely<Database> = useDb()): Promise<Conflict[]> {
  if (!candidates.length) return []
  const all = [...(await sectionRows(db).execute()) as SectionRow[], ...candidates]
  const names = await taNames(db, [...new Set(all.flatMap((r) => r.taIds))])
  return findConflicts(all.map(scheduled), names).filter((c) => c.sectionIds.some((id) => id < 0))
}

export async function sectionViews(where: { courseId?: number, ids?: number[] }, db: Kysely<Database> = useDb()): Promise<SectionView[]> {
  // The TAs' names come in the same statement: one round trip however many sections a course has.
  let query = sectionRows(db).select(sql<Array<{ id: number, name: string }>>`coalesce((select
    json_agg(json_build_object('id', u.id, 'name', u.name) order by st.user_id)
    from section_tas st join users u on u.id = st.user_id where st.section_id = sections.id), '[]')`.as('tas'))
  if (where.courseId !== undefined) query = query.where('sections.courseId', '=', where.courseId)
  if (where.ids) query = query.where('sections.id', 'in', where.ids.length ? where.ids : [-1])
  const rows = (await query.execute()) as Array<SectionRow & { tas: Array<{ id: number, name: string }> }>
  return rows.map((r) => ({
    id: r.id,
    courseId: r.courseId,
    code: r.code,
    weekday: r.weekday,
    startTime: r.startTime.slice(0, 5),
    endTime: r.endTime.slice(0, 5),
    room: r.room,
    hoodStations: r.hoodStations,
    studentsPerStation: r.studentsPerStation,
    firstDate: r.firstDate,
    lastDate: r.lastDate,
    skippedDates: [...r.skippedDates].sort(),
    tas: r.tas,
    enrolled: r.enrolled,
    meetings: meetingsOf(r),
  }))
}

export type { SectionRow }
