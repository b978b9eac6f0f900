import type { FactorStats } from '#shared/types/summary'
import type { ResultsListItem } from '#shared/types/results'
import { keyFactorValue } from '#shared/utils/key-factor'

// The practicals whose class results the caller may read (instructors: their courses; TAs:
// practicals run in their sections), each with n and its headline factor over the whole class.
export default defineEventHandler(async (event): Promise<ResultsListItem[]> => {
  const me = requireRole(event, 'instructor', 'ta')
  const courseIds = await visibleCourseIds(me)
  if (!courseIds.length) return []
  const db = useDb()
  const mySections = me.role === 'ta'
    ? (await db.selectFrom('sectionTas').select('sectionId').where('userId', '=', me.id).execute()).map((r) => r.sectionId)
    : null
  let query = db.selectFrom('practicals')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .innerJoin('practicalSessions', 'practicalSessions.practicalId', 'practicals.id')
    .select((eb) => ['practicals.id', 'practicals.title', 'practicals.substrateId', 'practicals.methodId', 'courses.id as courseId', 'courses.code', 'courses.term',
      'courses.outlierTest', 'courses.outlierAlpha', 'courses.zscoreLimit',
      'substrates.name as substrateName', 'methods.name as methodName', eb.fn.max('practicalSessions.meetingDate').as('lastMeeting')])
    .where('practicals.courseId', 'in', courseIds)
    .groupBy(['practicals.id', 'courses.id', 'substrates.id', 'methods.id'])
  if (mySections) query = query.where('practicalSessions.sectionId', 'in', mySections.length ? mySections : [-1])
  const practicals = await query.orderBy('lastMeeting', 'desc').orderBy('practicals.id').execute()
  if (!practicals.length) return []
  // Each unit's newest accepted-or-pending version, in one pass over every listed practical.
  const latest = await latestUnitVersions(db, practicals.map((p) => p.id))
    .select(['s.id as submissionId', 's.sectionId', 's.status', 's.practicalId', 's.factorSecondary', 's.factorTertiary', 's.excludedAt'])
    .execute()
  const rows = latest.filter((r) => r.excludedAt === null)
  return Promise.all(practicals.map(async (p): Promise<ResultsListItem> => {
    const chemistry = await practicalChemistry(p)
    const mine = rows.filter((r) => r.practicalId === p.id)
    const values = mine.flatMap((r) => {
      const value = keyFactorValue(r, chemistry.keyFactor)
      return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value: Number(value) }]
    })
    // The course's own test, so the list leads with the same figure as the class page.
    const [s] = await classFactorStats([{
      values, settings: { test: p.outlierTest, alpha: p.outlierAlpha, zscoreLimit: p.zscoreLimit },
      unreviewed: mine.filter((r) => r.status === 'pending').map((r) => r.submissionId),
    }]) as [FactorStats]
    return {
      practicalId: p.id, title: p.title, courseId: p.courseId, courseCode: p.code, term: p.term,
      substrateName: p.substrateName, methodName: p.methodName, keyFactor: chemistry.keyFactor,
      literature: chemistry.literature[chemistry.keyFactor], n: s.n, mean: s.mean, ci95: s.ci95, median: s.median, headline: s.headline,
      lastMeeting: (p.lastMeeting as string | null) ?? null,
    }
  }))
})
