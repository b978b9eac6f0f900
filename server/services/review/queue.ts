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
import { requireReviewerOf, requireReviewerWith, reviewSectionIds } from './scope'
import { practicalChemistry, sharedChemistryOf } from '../submissions/practical-chemistry'
import {
  queueColumnsText, queueReadOf, readReviewQueue, readReviewQueueOrder, type ClassValueRow, type MemberRow, type QueueRead,
} from './queue-read'
import { useDb } from '../../utils/db'
import { jsonBytes, type JsonBytes } from '../../utils/json-text'
import { sizedMemo } from '../../engines/memo'

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
    .select(['s.id', 's.factorSecondary', 's.factorTertiary', 's.excludedAt']).execute()
  const values = rows.filter((r) => r.excludedAt === null).map((r): ClassValueRow => [r.id, r.factorSecondary, r.factorTertiary])
  return classOutliersOf(scope, keyFactor, values)
}

/** The outlier test over class values already read (readReviewQueue reads them with the rows). */
export async function classOutliersOf(
  scope: ReviewerScope, keyFactor: ReviewFactorKey, classValues: ClassValueRow[],
): Promise<ClassOutliers> {
  const values = classValues.flatMap(([submissionId, factorSecondary, factorTertiary]) => {
    const value = keyFactorValue({ factorSecondary, factorTertiary }, keyFactor)
    return value === null || !Number.isFinite(value) ? [] : [{ submissionId, value }]
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
export function compareQueueRows(
  a: Pick<QueueRow, 'id' | 'status' | 'attention' | 'submittedAt'>, b: Pick<QueueRow, 'id' | 'status' | 'attention' | 'submittedAt'>,
): number {
  // submittedAt is always toISOString()'s fixed format: plain string order is time order, and
  // costs far less than a locale comparison over thousands of rows.
  return queueBucket(a) - queueBucket(b) || (a.submittedAt < b.submittedAt ? -1 : a.submittedAt > b.submittedAt ? 1 : 0) || a.id - b.id
}

/** A work unit as the queue shows it: its people (name order, once each) and their station. */
export function unitViewOf(row: { unitKey: string }, members: MemberRow[]): UnitView {
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

/**
 * The practical's chemistry and its review queue, as the grade sheet and bulk accept read them:
 * every work unit's latest version in the caller's sections, flagged and sorted, with the
 * sections the caller reviews. The chemistry and the one queue statement (readReviewQueue) run
 * side by side.
 */
export async function reviewQueueOf(scope: ReviewerScope) {
  const [chemistry, read] = await Promise.all([
    practicalChemistry(scope.practical),
    readReviewQueue(useDb(), {
      practicalId: scope.practical.id, sections: reviewSectionIds(scope), sessionSectionIds: scope.sessionSectionIds,
    }),
  ])
  return { chemistry, ...(await reviewQueueFrom(scope, chemistry.keyFactor, read)) }
}

/**
 * The queue page's scope (requireReviewerOf) and everything its answer is made of but the
 * filters, read in one statement as JSON text (queueColumnsText): the rows the caller may see,
 * their sections, the class values and the practical's chemistry row.
 */
export async function requireReviewQueuePage(event: H3Event, practicalId: number) {
  const { scope, columns: text } = await requireReviewerWith(event, practicalId, queueColumnsText)
  return { scope, text }
}

// The queue page's answers, remembered as the JSON sent. The key names everything an answer is
// made of: the text read (the rows the caller may see, the sections, the class values and the
// chemistry row), the caller's role, the practical and course as the scope read them (the
// outlier test's settings, the release) and the filters. An answer is only ever given for the
// same rows the caller was allowed to read, and any new version, review, exclusion, edit of the
// chemistry or of the course is a new key. Bounded by the characters held (key and answer).
const rememberQueuePage = sizedMemo(8_000_000)

/** The queue page (requireReviewQueuePage) as the JSON the route sends. */
export function reviewQueueJson(
  { scope, text }: Awaited<ReturnType<typeof requireReviewQueuePage>>, query: ParsedQueueQuery,
): Promise<JsonBytes> {
  const key = `${JSON.stringify([scope.role, scope.practical, scope.course, query])}${text}`
  return rememberQueuePage(key, 2 * key.length, async () => {
    const { chemistry: row, ...read } = queueReadOf(text)
    // The remembered chemistry, shared: read, never changed.
    const chemistry = await sharedChemistryOf(row)
    const queue = await reviewQueueFrom(scope, chemistry.keyFactor, read)
    return jsonBytes(Buffer.from(JSON.stringify(reviewQueueView({ scope, chemistry, ...queue }, query))))
  })
}

async function reviewQueueFrom(scope: ReviewerScope, keyFactor: ReviewFactorKey, read: QueueRead) {
  const outliers = await classOutliersOf(scope, keyFactor, read.classValues)
  const rows = read.rows.map((s): QueueRow => {
    const { flags, attention } = flagsWithOutlier(s.flags, s.id, outliers, keyFactor)
    const excluded = s.excludedAt
      ? { at: new Date(s.excludedAt).toISOString(), by: s.excludedByName, reason: s.exclusionReason ?? '' }
      : null
    return {
      id: s.id,
      unit: unitViewOf(s, s.members),
      section: { id: s.sectionId, code: s.sectionCode },
      version: s.version,
      submittedAt: new Date(s.createdAt).toISOString(),
      late: s.late,
      status: s.status,
      keyFactor: keyFactorValue(s, keyFactor),
      flags,
      attention,
      excluded,
      clean: s.status === 'pending' && attention === 0 && !excluded,
      toMark: s.status === 'accepted' && s.acceptance !== null && s.acceptance.total === null,
    }
  })
  return { rows: rows.sort(compareQueueRows), outliers, sections: read.sections }
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
export function nextPendingAfter(rows: Array<Pick<QueueRow, 'id' | 'status'>>, currentId: number): number | null {
  const pending = rows.filter((r) => r.status === 'pending')
  const at = rows.findIndex((r) => r.id === currentId)
  const after = pending.find((r) => r.id !== currentId && rows.indexOf(r) > at)
  return (after ?? pending.find((r) => r.id !== currentId))?.id ?? null
}

/** The practical as the review pages show it. */
export function queuePracticalOf(
  scope: ReviewerScope, chemistry: Readonly<Pick<PracticalChemistry, 'keyFactor' | 'expected'>>,
): QueuePractical {
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
    const { rows, sections } = await reviewQueueOrder(scope)
    return {
      id,
      title: scope.practical.title,
      course: { id: scope.course.id, code: scope.course.code, title: scope.course.title, term: scope.course.term },
      sections: sections.map((s) => s.code),
      counts: countQueueRows(rows),
    }
  }))
}

/**
 * The queue's rows as far as counting and ordering go (id, status, attention with the outlier
 * test, when, excluded), sorted as the queue is, with the reviewer's sections: what the counts,
 * the home pages' cards and a submission's "next pending" need, without people or reviews. A
 * caller that has the practical's key factor passes it, sparing the chemistry's read.
 */
export async function reviewQueueOrder(scope: ReviewerScope, knownKeyFactor?: ReviewFactorKey) {
  const [keyFactor, read] = await Promise.all([
    knownKeyFactor ?? practicalChemistry(scope.practical).then((c) => c.keyFactor),
    readReviewQueueOrder(useDb(), {
      practicalId: scope.practical.id, sections: reviewSectionIds(scope), sessionSectionIds: scope.sessionSectionIds,
    }),
  ])
  const outliers = await classOutliersOf(scope, keyFactor, read.classValues)
  const rows = read.rows.map((s) => ({
    id: s.id,
    status: s.status,
    attention: flagsWithOutlier(s.flags, s.id, outliers, keyFactor).attention,
    submittedAt: new Date(s.createdAt).toISOString(),
    excluded: s.excluded,
  }))
  return { rows: rows.sort(compareQueueRows), sections: read.sections, outliers }
}

/** The queue's counts without its rows (reviewQueueOrder). */
export async function reviewQueueCounts(scope: ReviewerScope): Promise<QueueCounts> {
  return countQueueRows((await reviewQueueOrder(scope)).rows)
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

type QueuePage = Awaited<ReturnType<typeof reviewQueueFrom>> & {
  scope: ReviewerScope
  chemistry: Readonly<Pick<PracticalChemistry, 'keyFactor' | 'expected'>>
}

/** The queue page of one practical: counts and flag codes over the chosen section, rows filtered. */
function reviewQueueView({ scope, chemistry, rows, outliers, sections }: QueuePage, query: ParsedQueueQuery): QueueResponse {
  const inSection = query.section ? rows.filter((r) => r.section.id === query.section) : rows
  return {
    practical: queuePracticalOf(scope, chemistry),
    role: scope.role,
    sections,
    rows: inSection.filter((r) => matchesQueueQuery(r, query)),
    counts: countQueueRows(inSection),
    flagCodes: flagCodeCounts(inSection),
    outliers: outliers.run,
  }
}
