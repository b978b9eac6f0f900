import type { ReviewerScope } from './scope'
import { KEY_FACTOR_LABELS } from '#shared/types/review'
import { SUBMISSION_STATUS_LABELS } from '#shared/types/submission'
import { toSafeCsv, type CsvCell } from '#shared/utils/csv-safe'
import { reviewSafeFileName } from './downloads'
import { unitViewOf } from './queue'
import { acceptanceJson, latestInScope, latestUnitIdsOf, membersJson, numberOrNull, type MemberRow } from './queue-read'
import { reviewSectionIds } from './scope'
import { practicalChemistry } from '../submissions/practical-chemistry'
import { keyFactorValue } from '#shared/utils/key-factor'
import type { SubmissionStatus } from '../../database/schema'
import { useDb } from '../../utils/db'
import { sql } from 'kysely'

// The grade sheet: one row per student in the caller's sections (partners each get their work
// unit's row; a student with nothing uploaded gets an empty one), made safe for spreadsheets.

interface UnitRow {
  id: number
  sectionCode: string
  unitKey: string
  version: number
  status: SubmissionStatus
  late: boolean
  factorSecondary: number | null
  factorTertiary: number | null
  excluded: boolean
  exclusionReason: string | null
  members: MemberRow[]
  acceptance: { total: number | null, scores: Record<string, number> } | null
}

interface SheetRow {
  userId: number
  name: string
  email: string
  section: string
  station: number | null
  unit: UnitRow | null
}

/**
 * Each work unit's latest version in the caller's sections, as the queue chooses them, with what
 * the sheet prints: its people and its latest acceptance's marks. No flags or outlier test: the
 * sheet shows neither, and sorts by section, station and name.
 */
async function gradeUnits(scope: ReviewerScope): Promise<UnitRow[]> {
  const db = useDb()
  const sections = reviewSectionIds(scope)
  const { rows: [row] } = await sql<{ units: UnitRow[] }>`select coalesce((select json_agg(json_build_object(
      'id', s.id, 'sectionCode', c.code, 'unitKey', s.unit_key, 'version', s.version, 'status', s.status, 'late', s.late,
      'factorSecondary', s.factor_secondary, 'factorTertiary', s.factor_tertiary, 'excluded', s.excluded_at is not null,
      'exclusionReason', s.exclusion_reason, 'members', ${membersJson}, 'acceptance', ${acceptanceJson(true)}))
    from (${latestUnitIdsOf(db, scope.practical.id, sections)}) l
    join submissions s on s.id = l.id join sections c on c.id = s.section_id
    where ${latestInScope(sections)}), '[]') as units`.execute(db)
  return row!.units
}

/** The active students of the caller's sections. */
async function activeRoster(scope: ReviewerScope) {
  if (!scope.sessionSectionIds.length) return []
  return useDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .innerJoin('sections', 'sections.id', 'enrollments.sectionId')
    .select(['users.id', 'users.name', 'users.email', 'sections.code', 'enrollments.station'])
    .where('enrollments.sectionId', 'in', scope.sessionSectionIds).where('enrollments.status', '=', 'active').execute()
}

// localeCompare builds a collator on every call; one made once orders the same, many times faster
// over a department's thousands of rows.
const byText = new Intl.Collator().compare

/** The registrar's id of each student active in the course, so the sheet can be matched to their list. */
async function studentIdsOf(courseId: number): Promise<Map<number, string>> {
  const rows = await useDb().selectFrom('enrollments').select(['userId', 'studentId'])
    .where('courseId', '=', courseId).where('status', '=', 'active').where('studentId', 'is not', null).execute()
  return new Map(rows.map((r) => [r.userId, r.studentId!]))
}

export async function buildGradeSheet(scope: ReviewerScope): Promise<{ fileName: string, csv: string }> {
  const [chemistry, units, roster, studentIds] = await Promise.all([
    practicalChemistry(scope.practical), gradeUnits(scope), activeRoster(scope), studentIdsOf(scope.course.id),
  ])
  const sheet: SheetRow[] = units.flatMap((unit) => {
    const view = unitViewOf(unit, unit.members)
    return view.members.map((m) => ({ userId: m.id, name: m.name, email: m.email, section: unit.sectionCode, station: view.station, unit }))
  })
  // Students with nothing uploaded get an empty row.
  const seen = new Set(sheet.map((r) => r.userId))
  for (const s of roster) {
    if (!seen.has(s.id)) sheet.push({ userId: s.id, name: s.name, email: s.email, section: s.code, station: s.station, unit: null })
  }
  sheet.sort((a, b) => byText(a.section, b.section) || (a.station ?? Infinity) - (b.station ?? Infinity) || byText(a.name, b.name))

  const rubric = scope.course.rubric
  // The student id leads: it is what the registrar's list is matched on.
  const header = [
    'Student ID', 'Student', 'E-mail', 'Section', 'Station', 'Version', 'Status', `Selectivity ${KEY_FACTOR_LABELS[chemistry.keyFactor]}`,
    ...rubric.map((c) => `${c.label} (of ${c.maxPoints})`), 'Total', 'Late', 'Excluded from class statistics', 'Exclusion reason',
  ]
  const body = sheet.map((r): CsvCell[] => {
    const u = r.unit
    // The marks of an accepted version's latest acceptance.
    const grade = u?.status === 'accepted' ? u.acceptance : null
    const factor = u ? numberOrNull(keyFactorValue(u, chemistry.keyFactor)) : null
    return [
      studentIds.get(r.userId) ?? null, r.name, r.email, r.section, r.station, u?.version ?? null,
      u ? SUBMISSION_STATUS_LABELS[u.status] : 'No submission',
      factor === null ? null : Math.round(factor * 1000) / 1000,
      ...rubric.map((c) => grade?.scores[c.key] ?? null), grade?.total ?? null,
      u ? (u.late ? 'yes' : 'no') : null, u ? (u.excluded ? 'yes' : 'no') : null, u?.excluded ? (u.exclusionReason ?? '') : null,
    ]
  })
  return {
    fileName: reviewSafeFileName(`${scope.course.code}-${scope.practical.title}-grades.csv`, 'grades.csv'),
    csv: toSafeCsv(header, body),
  }
}
