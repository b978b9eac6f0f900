import type { ReviewerScope } from './scope'
import { KEY_FACTOR_LABELS, type QueueRow } from '#shared/types/review'
import { SUBMISSION_STATUS_LABELS } from '#shared/types/submission'
import { toSafeCsv, type CsvCell } from '#shared/utils/csv-safe'
import { reviewSafeFileName } from './downloads'
import { reviewQueueOf } from './queue'
import { useDb } from '../../utils/db'

// The grade sheet: one row per student in the caller's sections (partners each get their work
// unit's row; a student with nothing uploaded gets an empty one), made safe for spreadsheets.

interface SheetRow {
  userId: number
  name: string
  email: string
  section: string
  station: number | null
  unit: QueueRow | null
}

async function acceptedScores(rows: QueueRow[]): Promise<Map<number, { scores: Record<string, number>, total: number | null }>> {
  const ids = rows.filter((r) => r.status === 'accepted').map((r) => r.id)
  if (!ids.length) return new Map()
  const reviews = await useDb().selectFrom('reviews').select(['submissionId', 'scores', 'total'])
    .where('submissionId', 'in', ids).where('decision', '=', 'accept')
    .orderBy('submissionId').orderBy('createdAt', 'desc').orderBy('id', 'desc').execute()
  const latest = new Map<number, { scores: Record<string, number>, total: number | null }>()
  for (const r of reviews) {
    if (!latest.has(r.submissionId)) latest.set(r.submissionId, { scores: r.scores as Record<string, number>, total: r.total })
  }
  return latest
}

async function rosterWithoutWork(scope: ReviewerScope, seen: Set<number>): Promise<SheetRow[]> {
  if (!scope.sessionSectionIds.length) return []
  const students = await useDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .innerJoin('sections', 'sections.id', 'enrollments.sectionId')
    .select(['users.id', 'users.name', 'users.email', 'sections.code', 'enrollments.station'])
    .where('enrollments.sectionId', 'in', scope.sessionSectionIds).where('enrollments.status', '=', 'active').execute()
  return students.filter((s) => !seen.has(s.id))
    .map((s) => ({ userId: s.id, name: s.name, email: s.email, section: s.code, station: s.station, unit: null }))
}

/** The registrar's id of each student active in the course, so the sheet can be matched to their list. */
async function studentIdsOf(courseId: number): Promise<Map<number, string>> {
  const rows = await useDb().selectFrom('enrollments').select(['userId', 'studentId'])
    .where('courseId', '=', courseId).where('status', '=', 'active').where('studentId', 'is not', null).execute()
  return new Map(rows.map((r) => [r.userId, r.studentId!]))
}

export async function buildGradeSheet(scope: ReviewerScope): Promise<{ fileName: string, csv: string }> {
  const { chemistry, rows } = await reviewQueueOf(scope)
  const grades = await acceptedScores(rows)
  const sheet: SheetRow[] = rows.flatMap((unit) => unit.unit.members.map((m) => ({
    userId: m.id, name: m.name, email: m.email, section: unit.section.code, station: unit.unit.station, unit,
  })))
  sheet.push(...await rosterWithoutWork(scope, new Set(rows.flatMap((r) => r.unit.members.map((m) => m.id)))))
  sheet.sort((a, b) =>
    a.section.localeCompare(b.section) || (a.station ?? Infinity) - (b.station ?? Infinity) || a.name.localeCompare(b.name))

  const studentIds = await studentIdsOf(scope.course.id)
  const rubric = scope.course.rubric
  // The student id leads: it is what the registrar's list is matched on.
  const header = [
    'Student ID', 'Student', 'E-mail', 'Section', 'Station', 'Version', 'Status', `Selectivity ${KEY_FACTOR_LABELS[chemistry.keyFactor]}`,
    ...rubric.map((c) => `${c.label} (of ${c.maxPoints})`), 'Total', 'Late', 'Excluded from class statistics', 'Exclusion reason',
  ]
  const body = sheet.map((r): CsvCell[] => {
    const u = r.unit
    const grade = u ? grades.get(u.id) : undefined
    return [
      studentIds.get(r.userId) ?? null, r.name, r.email, r.section, r.station, u?.version ?? null,
      u ? SUBMISSION_STATUS_LABELS[u.status] : 'No submission',
      u?.keyFactor == null ? null : Math.round(u.keyFactor * 1000) / 1000,
      ...rubric.map((c) => grade?.scores[c.key] ?? null), grade?.total ?? null,
      u ? (u.late ? 'yes' : 'no') : null, u ? (u.excluded ? 'yes' : 'no') : null, u?.excluded?.reason ?? null,
    ]
  })
  return {
    fileName: reviewSafeFileName(`${scope.course.code}-${scope.practical.title}-grades.csv`, 'grades.csv'),
    csv: toSafeCsv(header, body),
  }
}
