import { sql, type Kysely, type RawBuilder } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import type { Database, StoredFlag, SubmissionStatus } from '../../database/schema'
import { visibleSectionIds } from '../../utils/access'
import { compiledOnce, useDb } from '../../utils/db'
import { chemistryRowJson, type ChemistryRow } from '../submissions/practical-chemistry'
import { latestUnitVersions } from '../results/latest-versions'

// What the review queue reads, in one statement: each work unit's latest version in the
// caller's sections with its people, excluder and last acceptance, the sections the caller
// reviews, and the class's values for the outlier test.
//
// At the size of a department a practical holds thousands of versions, most of them outside a
// TA's sections: the latest version of each unit is chosen over the units that have a version in
// those sections only, from an index that holds the columns the choice needs
// (submissions_latest_cover), and the wide rows are read for the chosen versions alone.

export type MemberRow = { id: number, name: string, email: string, station: number | null }

export interface QueueSqlRow {
  id: number
  sectionId: number
  sectionCode: string
  unitKey: string
  version: number
  createdAt: string
  late: boolean
  status: SubmissionStatus
  flags: StoredFlag[]
  factorSecondary: number | null
  factorTertiary: number | null
  excludedAt: string | null
  exclusionReason: string | null
  excludedByName: string | null
  members: MemberRow[]
  /** The version's latest acceptance, if any (a null total: criteria are still to mark). */
  acceptance: { total: number | null } | null
}

/** A class value the outlier test reads: [submission id, 2°:1°, 3°:1°] of each latest, not excluded version. */
export type ClassValueRow = [number, number | null, number | null]

/**
 * The latest version of each work unit (ids and section), over the whole practical (`sections`
 * null) or over the units with any version in `sections`; the caller keeps those whose latest
 * version is in them, so a unit that moved on to another section leaves the queue as before.
 */
export function latestUnitIdsOf(db: Kysely<Database>, practicalId: IdOrColumn, sections: SectionsOrColumn | null) {
  return db.selectFrom('submissions').distinctOn('unitKey').select(['id', 'sectionId'])
    .where('practicalId', '=', practicalId)
    .$if(sections !== null, (query) => query.where('unitKey', 'in', (eb) => eb.selectFrom('submissions').select('unitKey')
      .where('practicalId', '=', practicalId).where(sql<boolean>`section_id = ${sectionsIn(sections!)}`)))
    .orderBy('unitKey').orderBy('version', 'desc')
}

// The queue's statements are built and compiled once per shape (every section, or some) and
// then only given each request's values (compiledOnce, server/utils/db.ts).
type QueueShape = 'every section' | 'some sections'
const shapeOf = (sections: number[] | null): QueueShape => (sections === null ? 'every section' : 'some sections')
const sectionsFor = (shape: QueueShape, sections: number[]) => (shape === 'every section' ? null : sections)

/** Numbers in JSON arrive as numbers; NaN or Infinity stored in a numeric arrives as text. */
export const numberOrNull = (value: unknown): number | null => (value === null || value === undefined ? null : Number(value))

export interface QueueRead {
  rows: QueueSqlRow[]
  sections: Array<{ id: number, code: string }>
  classValues: ClassValueRow[]
}

interface QueueScope { practicalId: number, sections: number[] | null, sessionSectionIds: number[] }

// A value sent with the statement, or SQL over the statement around (`p.id`, the caller's sections).
type IdOrColumn = number | RawBuilder<number>
type SectionsOrColumn = number[] | RawBuilder<number[]>

const sectionsIn = (sections: SectionsOrColumn) => sql`any(${sections}::int[])`

/** Whether the latest version `l` (latestUnitIdsOf) is in the caller's sections. */
export const latestInScope = (sections: SectionsOrColumn | null) =>
  (sections === null ? sql`true` : sql`l.section_id = ${sectionsIn(sections)}`)

/** The reviewer's sections for the filter, by code. */
const sectionsJson = (sessionSectionIds: SectionsOrColumn) => sql`coalesce((select json_agg(json_build_object('id', id, 'code', code)
  order by code) from sections where id = ${sectionsIn(sessionSectionIds)}), '[]')`

/** [id, 2°:1°, 3°:1°] of each unit's latest pending-or-accepted version, unless excluded (the outlier test's input). */
const classValuesJson = (db: Kysely<Database>, practicalId: IdOrColumn) => sql`coalesce((select
  json_agg(json_build_array(v.id, v.factor_secondary, v.factor_tertiary))
  from (${latestUnitVersions(db, [practicalId]).select(['s.id', 's.factorSecondary', 's.factorTertiary', 's.excludedAt'])}) v
  where v.excluded_at is null), '[]')`

const classValuesOf = (values: ClassValueRow[]): ClassValueRow[] =>
  values.map(([id, secondary, tertiary]) => [id, numberOrNull(secondary), numberOrNull(tertiary)])

/** The people of version `s` (name order) with their station in its section: MemberRow[]. */
export const membersJson = sql`coalesce((select json_agg(json_build_object('id', u.id, 'name', u.name, 'email', u.email,
    'station', e.station) order by u.name, u.id)
  from submission_members sm join users u on u.id = sm.user_id
  left join enrollments e on e.user_id = sm.user_id and e.section_id = s.section_id
  where sm.submission_id = s.id), '[]')`

/** Version `s`'s latest acceptance: { total } (and its scores), or null. */
export const acceptanceJson = (withScores: boolean) => sql`(select
  json_build_object('total', r.total${withScores ? sql`, 'scores', r.scores` : sql``})
  from reviews r where r.submission_id = s.id and r.decision = 'accept' order by r.created_at desc, r.id desc limit 1)`

/** The queue's rows in `sections` (null: every section): QueueSqlRow[]. */
const queueRowsJson = (db: Kysely<Database>, practicalId: IdOrColumn, sections: SectionsOrColumn | null) => sql`coalesce((select
    json_agg(json_build_object(
      'id', s.id, 'sectionId', s.section_id, 'sectionCode', sec.code, 'unitKey', s.unit_key, 'version', s.version,
      'createdAt', s.created_at, 'late', s.late, 'status', s.status, 'flags', s.flags,
      'factorSecondary', s.factor_secondary, 'factorTertiary', s.factor_tertiary,
      'excludedAt', s.excluded_at, 'exclusionReason', s.exclusion_reason, 'excludedByName', x.name,
      'members', ${membersJson}, 'acceptance', ${acceptanceJson(false)}))
    from (${latestUnitIdsOf(db, practicalId, sections)}) l
    join submissions s on s.id = l.id
    join sections sec on sec.id = s.section_id
    left join users x on x.id = s.excluded_by
    where ${latestInScope(sections)}), '[]')`

/**
 * The queue's rows in `sections` (null: every section), the reviewer's sections for the filter
 * (`sessionSectionIds`) and the class values, in one round trip.
 */
type QueueRow = { rows: QueueSqlRow[], sections: QueueRead['sections'], classValues: ClassValueRow[] }
const queueRead = compiledOnce((db, shape: QueueShape, practicalId: number, sections: number[], sessionSectionIds: number[]) =>
  sql<QueueRow>`
    select
      ${queueRowsJson(db, practicalId, sectionsFor(shape, sections))} as rows,
      ${sectionsJson(sessionSectionIds)} as sections,
      ${classValuesJson(db, practicalId)} as class_values`)

/** readReviewQueue's read with the practical's chemistry row, as queueColumns reads it. */
export interface QueueColumns extends QueueRow {
  chemistry: ChemistryRow
}

/**
 * readReviewQueue's read and the practical's chemistry row (practicalChemistryOfRow) as one JSON
 * column over the practical `p` and course `c` of requirePracticalAccessWith, for the reviewer
 * `me`: every section for the course's instructors, their own for TAs (`visibleSectionIds`,
 * read once). The queue page's scope check and reads are then one statement. For other roles
 * the route refuses before reading.
 */
function queueColumns(me: SessionUser) {
  const db = useDb()
  const own = visibleSectionIds(me)
  const sections = own ? sql<number[]>`r.own` : null
  const sessions = sql<number[]>`array(select ps.section_id from practical_sessions ps where ps.practical_id = p.id
    ${own ? sql`and ps.section_id = any(r.own)` : sql``})`
  return sql<QueueColumns>`(select json_build_object(
      'rows', ${queueRowsJson(db, sql`p.id`, sections)},
      'sections', ${sectionsJson(sessions)},
      'classValues', ${classValuesJson(db, sql`p.id`)},
      'chemistry', ${chemistryRowJson(sql`p.substrate_id`, sql`p.method_id`)})
    from (select ${own ?? sql`null::int[]`} as own) r)`
}

/** queueColumns as JSON text: sent unparsed, it is the key of a remembered answer (queue.ts). */
export const queueColumnsText = (me: SessionUser) => sql<string>`${queueColumns(me)}::text`

/** queueColumnsText's read, its numbers as readReviewQueue gives them. */
export function queueReadOf(text: string): QueueRead & { chemistry: ChemistryRow } {
  const read = JSON.parse(text) as QueueColumns
  return { ...queueReadFrom(read), chemistry: read.chemistry }
}

function queueReadFrom(row: QueueRow): QueueRead {
  for (const r of row.rows) {
    r.factorSecondary = numberOrNull(r.factorSecondary)
    r.factorTertiary = numberOrNull(r.factorTertiary)
  }
  return { rows: row.rows, sections: row.sections, classValues: classValuesOf(row.classValues) }
}

/**
 * The queue's rows in `sections` (null: every section), the reviewer's sections for the filter
 * (`sessionSectionIds`) and the class values, in one round trip.
 */
export async function readReviewQueue(
  db: Kysely<Database>, { practicalId, sections, sessionSectionIds }: QueueScope,
): Promise<QueueRead> {
  const [row] = await queueRead(db, shapeOf(sections), practicalId, sections ?? [], sessionSectionIds)
  return queueReadFrom(row!)
}

/** What ordering and counting the queue reads of each row: no people, excluder or reviews. */
export interface QueueOrderRow {
  id: number
  status: SubmissionStatus
  flags: StoredFlag[]
  createdAt: string
  excluded: boolean
}

type QueueOrderSqlRow = { rows: QueueOrderRow[], sections: QueueRead['sections'], classValues: ClassValueRow[] }
const queueOrderRead = compiledOnce((db, shape: QueueShape, practicalId: number, sections: number[], sessionSectionIds: number[]) =>
  sql<QueueOrderSqlRow>`
    select
      coalesce((select json_agg(json_build_object('id', s.id, 'status', s.status, 'flags', s.flags, 'createdAt', s.created_at,
          'excluded', s.excluded_at is not null))
        from (${latestUnitIdsOf(db, practicalId, sectionsFor(shape, sections))}) l join submissions s on s.id = l.id
        where ${latestInScope(sectionsFor(shape, sections))}), '[]') as rows,
      ${sectionsJson(sessionSectionIds)} as sections,
      ${classValuesJson(db, practicalId)} as class_values`)

/** The queue's rows as far as its order and counts go, the sections and the class values, in one round trip. */
export async function readReviewQueueOrder(
  db: Kysely<Database>, { practicalId, sections, sessionSectionIds }: QueueScope,
): Promise<{ rows: QueueOrderRow[], sections: QueueRead['sections'], classValues: ClassValueRow[] }> {
  const [row] = await queueOrderRead(db, shapeOf(sections), practicalId, sections ?? [], sessionSectionIds)
  return { rows: row!.rows, sections: row!.sections, classValues: classValuesOf(row!.classValues) }
}
