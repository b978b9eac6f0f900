// A student's work unit for a practical (their own, or their station's for pair work), read for
// an upload or its preview: the enrolment, the section's session, the partners, the last decision
// and the unit's newest version.
import { sql } from 'kysely'
import type { Kysely } from 'kysely'
import { createError } from 'h3'
import type { SessionUser } from '#shared/types/auth'
import { uploadDueAt, type LastDecision } from '#shared/utils/resubmit'
import type { PracticalScope } from '../../utils/access'
import { compiledOnce } from '../../utils/db'
import type { Database, Submission } from '../../database/schema'
import { chemistryRowJson, type ChemistryRow } from './practical-chemistry'
import { stationOfUnitKey, unitKeyOf } from './work-units'

export interface StudentWorkUnit {
  sectionId: number
  unitKey: string
  /** Everyone the result counts for: the student, and their station partner(s) for pair work. */
  memberIds: number[]
  dueAt: Date | null
  /** What a new upload's late mark is judged against: the section's due time, or a return's later one. */
  uploadDueAt: Date | null
  /** The day the caller's section runs the practical ('YYYY-MM-DD'). */
  meetingDate: string | null
}

/** A student's active enrolment in a section that runs the practical. */
export interface Enrolment {
  sectionId: number
  station: number | null
}

/**
 * The caller's enrolment (null: none) as JSON, over the practical `p` of the access statement:
 * `requirePracticalAccessWith(event, id, enrolmentColumns)`.
 */
export const enrolmentColumns = (me: SessionUser) => sql<Enrolment | null>`(
  select json_build_object('sectionId', e.section_id, 'station', e.station)
  from enrollments e where e.user_id = ${me.id} and e.status = 'active'
    and e.section_id in (select ps.section_id from practical_sessions ps where ps.practical_id = p.id)
  order by e.section_id limit 1)`

export interface UploadColumns {
  chemistry: ChemistryRow
  enrolment: Enrolment | null
}

/**
 * What an upload reads with the caller's scope (requirePracticalAccessWith): the practical's
 * chemistry row and the caller's enrolment, so the engine starts as soon as access is known and
 * the work unit is one more round trip, not two.
 */
export const uploadColumns = (me: SessionUser) => sql<UploadColumns>`json_build_object(
  'chemistry', ${chemistryRowJson(sql`p.substrate_id`, sql`p.method_id`)},
  'enrolment', ${enrolmentColumns(me)})`

/** The newest version of a unit as an upload's answer needs it. */
export type LatestVersion = Pick<Submission, 'id' | 'version' | 'status' | 'result' | 'flags' | 'late' | 'inputKind' | 'sha256'>

interface UnitRow {
  dueAt: Date | null
  meetingDate: string | null
  partners: number[]
  /** The newest decision on any version of the unit: a return's due time holds until a later accept. */
  last: { decision: LastDecision['decision'], resubmitDueAt: string | null } | null
  latest: LatestVersion | null
}

// Everything a unit needs once the enrolment is known, in one statement: its section's session,
// the station's partners (pair work), the last decision on the unit and its newest version.
const unitStatement = compiledOnce((db, _shape: 'unit', practicalId: number, sectionId: number, station: number | null, unitKey: string) =>
  sql<UnitRow>`select
    (select due_at from practical_sessions where practical_id = ${practicalId} and section_id = ${sectionId}) as due_at,
    (select meeting_date from practical_sessions where practical_id = ${practicalId} and section_id = ${sectionId}) as meeting_date,
    array(select user_id from enrollments where section_id = ${sectionId} and station = ${station} and status = 'active'
      order by seat) as partners,
    (select json_build_object('decision', r.decision, 'resubmitDueAt', r.resubmit_due_at)
      from reviews r join submissions s on s.id = r.submission_id
      where s.practical_id = ${practicalId} and s.unit_key = ${unitKey}
      order by r.created_at desc, r.id desc limit 1) as last,
    (select json_build_object('id', id, 'version', version, 'status', status, 'result', result, 'flags', flags, 'late', late,
        'inputKind', input_kind, 'sha256', sha256)
      from submissions where practical_id = ${practicalId} and unit_key = ${unitKey}
      order by version desc limit 1) as latest`)

/**
 * The caller's own work unit for a practical and its newest version: 404 unless they are a
 * student in a section that runs it. `enrolment` is the one read with the scope (enrolmentColumns,
 * uploadColumns).
 */
export async function unitAndLatest(
  db: Kysely<Database>, scope: PracticalScope, enrolment: Enrolment | null,
): Promise<{ unit: StudentWorkUnit, latest: LatestVersion | null }> {
  if (scope.role !== 'student') throw createError({ statusCode: 403, statusMessage: 'Only students upload results' })
  if (!enrolment) throw createError({ statusCode: 404, statusMessage: 'Practical not found' })
  const unitKey = unitKeyOf(scope.practical.workUnit, { userId: scope.me.id, ...enrolment })
  const station = stationOfUnitKey(unitKey)
  const [row] = await unitStatement(db, 'unit', scope.practical.id, enrolment.sectionId, station, unitKey)
  const { dueAt, meetingDate, partners, last, latest } = row!
  const lastDecision = last && { decision: last.decision, resubmitDueAt: last.resubmitDueAt ? new Date(last.resubmitDueAt) : null }
  return {
    unit: {
      sectionId: enrolment.sectionId,
      unitKey,
      memberIds: [...new Set([scope.me.id, ...partners])],
      dueAt,
      uploadDueAt: uploadDueAt(dueAt, lastDecision),
      meetingDate,
    },
    latest,
  }
}

/** The caller's own work unit for a practical: 404 unless they are a student in a section that runs it. */
export async function studentUnit(db: Kysely<Database>, scope: PracticalScope, enrolment: Enrolment | null): Promise<StudentWorkUnit> {
  return (await unitAndLatest(db, scope, enrolment)).unit
}
