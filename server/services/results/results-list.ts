import type { Kysely } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import type { Database } from '../../database/schema'
import type { FactorStats } from '#shared/types/summary'
import type { ResultsListItem } from '#shared/types/results'
import { keyFactorValue } from '#shared/utils/key-factor'
import { classFactorStats } from './class-statistics'
import { latestUnitVersions } from './latest-versions'
import { practicalChemistry } from '../submissions/practical-chemistry'
import { visibleCourseIds } from '../../utils/access'

/** The sections a TA works in; null for an instructor, who sees every section of their courses. */
async function taSectionIds(db: Kysely<Database>, me: SessionUser): Promise<number[] | null> {
  if (me.role !== 'ta') return null
  const rows = await db.selectFrom('sectionTas').select('sectionId').where('userId', '=', me.id).execute()
  return rows.map((r) => r.sectionId)
}

/** The practicals of some courses (a TA's: only those run in their sections), latest meeting first. */
function listedPracticals(db: Kysely<Database>, courseIds: number[], sections: number[] | null) {
  return db.selectFrom('practicals')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .innerJoin('practicalSessions', 'practicalSessions.practicalId', 'practicals.id')
    .select((eb) => [
      'practicals.id', 'practicals.title', 'practicals.substrateId', 'practicals.methodId',
      'courses.id as courseId', 'courses.code', 'courses.term', 'courses.outlierTest', 'courses.outlierAlpha', 'courses.zscoreLimit',
      'substrates.name as substrateName', 'methods.name as methodName', eb.fn.max('practicalSessions.meetingDate').as('lastMeeting'),
    ])
    .where('practicals.courseId', 'in', courseIds)
    .groupBy(['practicals.id', 'courses.id', 'substrates.id', 'methods.id'])
    .$if(sections !== null, (q) => q.where('practicalSessions.sectionId', 'in', sections!.length ? sections! : [-1]))
    .orderBy('lastMeeting', 'desc').orderBy('practicals.id')
    .execute()
}

type ListedPractical = Awaited<ReturnType<typeof listedPracticals>>[number]

/** Each unit's newest accepted-or-pending, not excluded version, in one pass over every listed practical. */
async function countedVersions(db: Kysely<Database>, practicalIds: number[]) {
  const latest = await latestUnitVersions(db, practicalIds)
    .select(['s.id as submissionId', 's.sectionId', 's.status', 's.practicalId', 's.factorSecondary', 's.factorTertiary', 's.excludedAt'])
    .execute()
  return latest.filter((r) => r.excludedAt === null)
}

type CountedVersion = Awaited<ReturnType<typeof countedVersions>>[number]

/** One practical's line: n and its headline factor by the course's own test, as the class page leads with. */
async function resultsListItem(p: ListedPractical, rows: CountedVersion[]): Promise<ResultsListItem> {
  const chemistry = await practicalChemistry(p)
  const mine = rows.filter((r) => r.practicalId === p.id)
  const values = mine.flatMap((r) => {
    const value = keyFactorValue(r, chemistry.keyFactor)
    return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value: Number(value) }]
  })
  const [s] = await classFactorStats([{
    values, settings: { test: p.outlierTest, alpha: p.outlierAlpha, zscoreLimit: p.zscoreLimit },
    unreviewed: mine.filter((r) => r.status === 'pending').map((r) => r.submissionId),
  }]) as [FactorStats]
  return {
    practicalId: p.id, title: p.title, courseId: p.courseId, courseCode: p.code, term: p.term,
    substrateName: p.substrateName, methodName: p.methodName, keyFactor: chemistry.keyFactor,
    literature: chemistry.literature[chemistry.keyFactor],
    n: s.n, mean: s.mean, ci95: s.ci95, median: s.median, headline: s.headline,
    lastMeeting: (p.lastMeeting as string | null) ?? null,
  }
}

/**
 * The practicals whose class results the caller may read (instructors: their courses; TAs:
 * practicals run in their sections), each with n and its headline factor over the whole class.
 */
export async function resultsList(db: Kysely<Database>, me: SessionUser): Promise<ResultsListItem[]> {
  const courseIds = await visibleCourseIds(me)
  if (!courseIds.length) return []
  const practicals = await listedPracticals(db, courseIds, await taSectionIds(db, me))
  if (!practicals.length) return []
  const rows = await countedVersions(db, practicals.map((p) => p.id))
  return Promise.all(practicals.map((p) => resultsListItem(p, rows)))
}
