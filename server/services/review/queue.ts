import { createHash } from 'node:crypto'
import type { PracticalChemistry } from '#shared/utils/submission'
import type { H3Event } from 'h3'
import type { ReviewerScope } from './scope'
import type { SessionUser } from '#shared/types/auth'
import type { StoredFlag, SubmissionStatus } from '../../database/schema'
import type { z } from 'zod'
import {
  KEY_FACTOR_LABELS, type queueQuerySchema, type ReviewFactorKey, type OutlierRun, type QueueCounts, type QueuePractical,
  type QueueResponse, type QueueRow, type ReviewFlag, type ReviewPracticalItem, type UnitMember, type UnitView,
} from '#shared/types/review'
import type { OutlierFinding } from '#shared/utils/outliers'
import { stationOfUnitKey } from '../submissions/work-units'
import { keyFactorValue } from '#shared/utils/key-factor'
import { classOutlierReport, rememberedClassFigures } from '../results/class-statistics'
import { latestUnitVersions } from '../results/latest-versions'
import { requireReviewerOf, reviewSectionIds } from './scope'
import { practicalChemistry } from '../submissions/practical-chemistry'
import { useDb } from '../../utils/db'
import { sql } from 'kysely'

// The review queue: each work unit's latest version in the caller's sections, with the stored
// flags plus a dynamic outlier flag from the course's chosen test over the whole class, sorted
// by what needs a person first.

export interface ClassOutliers {
  run: OutlierRun
  findings: Map<number, OutlierFinding>
}

/** The course's outlier test over every unit's latest pending-or-accepted, not excluded result. */
export async function classOutliersFor(scope: ReviewerScope, keyFactor: ReviewFactorKey): Promise<ClassOutliers> {
  // Only what the test reads: no mole percents to parse.
  const rows = await latestUnitVersions(useDb(), [scope.practical.id])
    .select(['s.id as submissionId', 's.factorSecondary', 's.factorTertiary', 's.excludedAt']).execute()
  const values = rows.filter((r) => r.excludedAt === null).flatMap((r) => {
    const value = keyFactorValue(r, keyFactor)
    return value === null || !Number.isFinite(value) ? [] : [{ submissionId: r.submissionId, value }]
  })
  const settings = { test: scope.course.outlierTest, alpha: scope.course.outlierAlpha, zscoreLimit: scope.course.zscoreLimit }
  // Every home page and review list runs the test on each practical: the report depends only on
  // the values and settings, so it is remembered under a hash of both (a new result is a new key).
  const key = `outliers:${createHash('sha256').update(JSON.stringify([values, settings])).digest('hex')}`
  const report = await rememberedClassFigures(key, values.length, () => classOutlierReport(values, settings))
  return {
    run: {
      test: report.test, applied: report.applied, n: values.length, alpha: settings.alpha, zscoreLimit: settings.zscoreLimit,
      maxOutliers: report.maxOutliers, note: report.note,
    },
    findings: new Map(report.outliers.map((o) => [o.submissionId, o])),
  }
}

const LATER_STEP = ', and a later step exceeds its critical value, so every value removed up to that step is an outlier'

const TEST_WORDING = {
  // A value removed before the deciding step is an outlier even when its own R is below λ.
  'gesd': (f: OutlierFinding, run: OutlierRun) =>
    `the generalized ESD test (α = ${run.alpha}, up to ${run.maxOutliers ?? '?'} outliers): removed at step ${f.step ?? 1} `
    + `with R = ${f.statistic.toFixed(3)} against the critical value ${f.critical.toFixed(3)}${f.statistic > f.critical ? '' : LATER_STEP}`,
  'grubbs': (f: OutlierFinding, run: OutlierRun) =>
    `Grubbs' test: G = ${f.statistic.toFixed(3)} is above the critical value ${f.critical.toFixed(3)} (α = ${run.alpha}, two-sided)`,
  'dixon': (f: OutlierFinding, run: OutlierRun) =>
    `Dixon's Q test: Q = ${f.statistic.toFixed(3)} is above the critical value ${f.critical.toFixed(3)} `
    + `(${Math.round((1 - run.alpha) * 100)} % confidence)`,
  'modified-z': (f: OutlierFinding) => `modified z-score: |M| = ${Math.abs(f.statistic).toFixed(2)} is above the limit ${f.critical}`,
} as const

export function outlierFlagOf(finding: OutlierFinding, run: OutlierRun, keyFactor: ReviewFactorKey): ReviewFlag {
  return {
    code: 'outlier',
    severity: 'warning',
    message: `The ${KEY_FACTOR_LABELS[keyFactor]} selectivity of ${finding.value.toFixed(2)} is an outlier among the class's ${run.n} results `
      + `by ${TEST_WORDING[run.test](finding, run)}. Check the run before it counts; exclude it from the class statistics if it is a bad run.`,
    test: run.test,
    statistic: finding.statistic,
    critical: finding.critical,
    ...(finding.step ? { step: finding.step } : {}),
  }
}

/** Flags as stored with a version, plus the outlier flag when the class test marks it. */
export function flagsWithOutlier(
  stored: StoredFlag[], submissionId: number, outliers: ClassOutliers, keyFactor: ReviewFactorKey,
): { flags: ReviewFlag[], attention: number, outlier: boolean } {
  const finding = outliers.findings.get(submissionId)
  const flags: ReviewFlag[] = finding ? [...stored, outlierFlagOf(finding, outliers.run, keyFactor)] : [...stored]
  const rank = { info: 0, warning: 1, danger: 2 } as const
  return { flags, attention: flags.reduce((max, f) => Math.max(max, rank[f.severity]), 0), outlier: Boolean(finding) }
}

/** 0 pending with a blocking flag, 1 pending with a warning, 2 other pending, 3 returned, 4 accepted. */
export function queueBucket(row: { status: SubmissionStatus, attention: number }): number {
  if (row.status === 'pending') return row.attention >= 2 ? 0 : row.attention === 1 ? 1 : 2
  return row.status === 'returned' ? 3 : 4
}

/** What needs attention first; within a group, the oldest submission first. */
export function compareQueueRows(a: QueueRow, b: QueueRow): number {
  return queueBucket(a) - queueBucket(b) || a.submittedAt.localeCompare(b.submittedAt) || a.id - b.id
}

type MemberRow = { id: number, name: string, email: string, station: number | null }

/** A work unit as the queue shows it: its people (name order, once each) and their station. */
function unitViewOf(row: { unitKey: string }, members: MemberRow[]): UnitView {
  const people: UnitMember[] = [...new Map(members.map((m) => [m.id, { id: m.id, name: m.name, email: m.email }])).values()]
  return {
    key: row.unitKey,
    label: people.map((p) => p.name).join(' & ') || row.unitKey,
    members: people,
    station: stationOfUnitKey(row.unitKey) ?? members.find((m) => m.station !== null)?.station ?? null,
  }
}

/** Names, e-mails and station of the people behind some submissions. */
export async function unitViewsOf(rows: Array<{ id: number, unitKey: string }>): Promise<Map<number, UnitView>> {
  const result = new Map<number, UnitView>()
  if (!rows.length) return result
  const members = await useDb().selectFrom('submissionMembers')
    .innerJoin('users', 'users.id', 'submissionMembers.userId')
    .innerJoin('submissions', 'submissions.id', 'submissionMembers.submissionId')
    .leftJoin('enrollments', (join) => join.onRef('enrollments.userId', '=', 'submissionMembers.userId')
      .onRef('enrollments.sectionId', '=', 'submissions.sectionId'))
    .select(['submissionMembers.submissionId', 'users.id', 'users.name', 'users.email', 'enrollments.station'])
    .where('submissionMembers.submissionId', 'in', rows.map((r) => r.id))
    .orderBy('users.name').orderBy('users.id').execute()
  for (const row of rows) result.set(row.id, unitViewOf(row, members.filter((m) => m.submissionId === row.id)))
  return result
}

/** The practical's chemistry and its review queue, as the queue page, the grade sheet and bulk accept read them. */
export async function reviewQueueOf(scope: ReviewerScope) {
  const chemistry = await practicalChemistry(scope.practical)
  return { chemistry, ...await buildReviewQueue(scope, chemistry.keyFactor) }
}

/**
 * Every work unit's latest version in the caller's sections, flagged and sorted. One query reads
 * the versions with their people (as unitViewsOf) and whether their latest acceptance left
 * criteria for a later pass (its total is still null).
 */
export async function buildReviewQueue(
  scope: ReviewerScope, keyFactor: ReviewFactorKey,
): Promise<{ rows: QueueRow[], outliers: ClassOutliers }> {
  const db = useDb()
  const sections = reviewSectionIds(scope)
  let query = db.selectFrom((eb) => eb.selectFrom('submissions').distinctOn('unitKey').selectAll()
    .where('practicalId', '=', scope.practical.id).orderBy('unitKey').orderBy('version', 'desc').as('s'))
    .innerJoin('sections', 'sections.id', 's.sectionId')
    .leftJoin('users as excluder', 'excluder.id', 's.excludedBy')
    .select(['s.id', 's.sectionId', 'sections.code as sectionCode', 's.unitKey', 's.version', 's.createdAt', 's.late', 's.status',
      's.flags',
      's.factorSecondary', 's.factorTertiary', 's.excludedAt', 's.exclusionReason', 'excluder.name as excludedByName',
      sql<MemberRow[]>`coalesce((select json_agg(json_build_object('id', u.id, 'name', u.name, 'email', u.email, 'station', e.station)
          order by u.name, u.id)
        from submission_members sm join users u on u.id = sm.user_id
        left join enrollments e on e.user_id = sm.user_id and e.section_id = s.section_id
        where sm.submission_id = s.id), '[]')`.as('members'),
      sql<boolean | null>`(select r.total is null from reviews r where r.submission_id = s.id and r.decision = 'accept'
        order by r.created_at desc, r.id desc limit 1)`.as('acceptedWithoutTotal'),
    ])
  if (sections) query = query.where('s.sectionId', 'in', sections.length ? sections : [-1])
  const [latest, outliers] = await Promise.all([query.execute(), classOutliersFor(scope, keyFactor)])
  const rows = latest.map((s): QueueRow => {
    const { flags, attention } = flagsWithOutlier(s.flags as StoredFlag[], s.id, outliers, keyFactor)
    const excluded = s.excludedAt ? { at: s.excludedAt.toISOString(), by: s.excludedByName, reason: s.exclusionReason ?? '' } : null
    return {
      id: s.id,
      unit: unitViewOf(s, s.members),
      section: { id: s.sectionId, code: s.sectionCode },
      version: s.version,
      submittedAt: s.createdAt.toISOString(),
      late: s.late,
      status: s.status,
      keyFactor: keyFactorValue(s, keyFactor),
      flags,
      attention,
      excluded,
      clean: s.status === 'pending' && attention === 0 && !excluded,
      toMark: s.status === 'accepted' && s.acceptedWithoutTotal === true,
    }
  })
  return { rows: rows.sort(compareQueueRows), outliers }
}

export function countQueueRows(rows: Array<Pick<QueueRow, 'status' | 'attention'> & { excluded: unknown }>): QueueCounts {
  return {
    total: rows.length,
    pending: rows.filter((r) => r.status === 'pending').length,
    accepted: rows.filter((r) => r.status === 'accepted').length,
    returned: rows.filter((r) => r.status === 'returned').length,
    flagged: rows.filter((r) => r.status === 'pending' && r.attention > 0).length,
    excluded: rows.filter((r) => r.excluded).length,
  }
}

/** The first pending row after `currentId` in queue order (wrapping round), never the current one. */
export function nextPendingAfter(rows: QueueRow[], currentId: number): number | null {
  const pending = rows.filter((r) => r.status === 'pending')
  const at = rows.findIndex((r) => r.id === currentId)
  const after = pending.find((r) => r.id !== currentId && rows.indexOf(r) > at)
  return (after ?? pending.find((r) => r.id !== currentId))?.id ?? null
}

/** The practical as the review pages show it. */
export function queuePracticalOf(scope: ReviewerScope, chemistry: Pick<PracticalChemistry, 'keyFactor' | 'expected'>): QueuePractical {
  return {
    id: scope.practical.id,
    title: scope.practical.title,
    course: { id: scope.course.id, code: scope.course.code, title: scope.course.title, term: scope.course.term },
    timezone: scope.course.timezone,
    keyFactor: chemistry.keyFactor,
    expected: chemistry.expected.factors[chemistry.keyFactor],
    comparedWith: chemistry.expected.description,
    expectedBasis: chemistry.expected.basis,
    releasePolicy: scope.course.releasePolicy,
    resultsReleasedAt: scope.practical.resultsReleasedAt?.toISOString() ?? null,
  }
}

/** Sections running the practical that the caller reviews, for the filter. */
export async function reviewSectionsOf(scope: ReviewerScope): Promise<Array<{ id: number, code: string }>> {
  const ids = scope.sessionSectionIds
  if (!ids.length) return []
  return useDb().selectFrom('sections').select(['id', 'code']).where('id', 'in', ids).orderBy('code').execute()
}

/** The practicals a reviewer works on (owned courses; a TA's sections), with their queue counts. */
export async function reviewPracticalItems(event: H3Event, me: SessionUser): Promise<ReviewPracticalItem[]> {
  const db = useDb()
  const candidates = me.role === 'instructor'
    ? await db.selectFrom('practicals').innerJoin('courseOwners', 'courseOwners.courseId', 'practicals.courseId')
        .select('practicals.id').where('courseOwners.userId', '=', me.id).orderBy('practicals.id').execute()
    : await db.selectFrom('practicals').innerJoin('practicalSessions', 'practicalSessions.practicalId', 'practicals.id')
        .innerJoin('sectionTas', 'sectionTas.sectionId', 'practicalSessions.sectionId')
        .select('practicals.id').distinct().where('sectionTas.userId', '=', me.id).orderBy('practicals.id').execute()
  // The practicals are independent: read side by side rather than one after another.
  return Promise.all(candidates.map(async ({ id }): Promise<ReviewPracticalItem> => {
    const scope = await requireReviewerOf(event, id)
    const [counts, sections] = await Promise.all([reviewQueueCounts(scope), reviewSectionsOf(scope)])
    return {
      id,
      title: scope.practical.title,
      course: { id: scope.course.id, code: scope.course.code, title: scope.course.title, term: scope.course.term },
      sections: sections.map((s) => s.code),
      counts,
    }
  }))
}

/**
 * The queue's counts without its rows: the same latest versions and flags as buildReviewQueue,
 * but only the columns a count reads (no people, excluder or review look-ups per unit).
 */
export async function reviewQueueCounts(scope: ReviewerScope): Promise<QueueCounts> {
  const { keyFactor } = await practicalChemistry(scope.practical)
  const sections = reviewSectionIds(scope)
  let query = useDb().selectFrom((eb) => eb.selectFrom('submissions').distinctOn('unitKey')
    .select(['id', 'sectionId', 'status', 'flags', 'excludedAt'])
    .where('practicalId', '=', scope.practical.id).orderBy('unitKey').orderBy('version', 'desc').as('s'))
    .select(['s.id', 's.status', 's.flags', 's.excludedAt'])
  if (sections) query = query.where('s.sectionId', 'in', sections.length ? sections : [-1])
  const [latest, outliers] = await Promise.all([query.execute(), classOutliersFor(scope, keyFactor)])
  return countQueueRows(latest.map((s) => ({
    status: s.status,
    attention: flagsWithOutlier(s.flags as StoredFlag[], s.id, outliers, keyFactor).attention,
    excluded: s.excludedAt,
  })))
}

type ParsedQueueQuery = z.output<typeof queueQuerySchema>

/** A row passes the ?status= and ?flag= filters ("any": every run that needs attention). */
function matchesQueueQuery(row: QueueRow, query: ParsedQueueQuery): boolean {
  if (query.status && row.status !== query.status) return false
  if (!query.flag) return true
  return query.flag === 'any' ? row.attention > 0 : row.flags.some((f) => f.code === query.flag)
}

/** How many rows carry each flag code, for the filter's choices. */
function flagCodeCounts(rows: QueueRow[]): QueueResponse['flagCodes'] {
  const codes = new Map<string, number>()
  for (const row of rows) for (const code of new Set(row.flags.map((f) => f.code))) codes.set(code, (codes.get(code) ?? 0) + 1)
  return [...codes].map(([code, count]) => ({ code, count })).sort((a, b) => a.code.localeCompare(b.code))
}

/** The queue page of one practical: counts and flag codes over the chosen section, rows filtered. */
export async function reviewQueueView(scope: ReviewerScope, query: ParsedQueueQuery): Promise<QueueResponse> {
  const { chemistry, rows, outliers } = await reviewQueueOf(scope)
  const inSection = query.section ? rows.filter((r) => r.section.id === query.section) : rows
  return {
    practical: queuePracticalOf(scope, chemistry),
    role: scope.role,
    sections: await reviewSectionsOf(scope),
    rows: inSection.filter((r) => matchesQueueQuery(r, query)),
    counts: countQueueRows(inSection),
    flagCodes: flagCodeCounts(inSection),
    outliers: outliers.run,
  }
}
