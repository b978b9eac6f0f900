import { medianOf } from '#shared/utils/lib/moments'
import type { ClassExample } from '#shared/types/chemistry'
import type { SessionUser } from '#shared/types/auth'
import { useDb } from '../../utils/db'
import { visibleCourseIds } from '../../utils/access'
import { latestUnitVersions, storedMolePercents } from './latest-versions'

/**
 * The explorer's worked example, taken from the caller's own class: the practical (in a course
 * they can see) with the most accepted results, and each product's class median mol % over the
 * latest accepted, not excluded, version of every work unit. Null when no practical has one.
 */
export async function classExampleFor(me: SessionUser): Promise<ClassExample | null> {
  const db = useDb()
  const courses = await visibleCourseIds(me)
  if (!courses.length) return null
  const practicals = await db.selectFrom('practicals')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .select(['practicals.id', 'practicals.title', 'courses.code', 'courses.term', 'substrates.name', 'substrates.smiles'])
    .where('practicals.courseId', 'in', courses).orderBy('practicals.id').execute()
  if (!practicals.length) return null
  const rows = await latestUnitVersions(db, practicals.map((p) => p.id), { statuses: ['accepted'], skipExcluded: true })
    .select(['s.practicalId', storedMolePercents.as('molePercents')]).execute()
  const byPractical = new Map<number, typeof rows>()
  for (const r of rows) byPractical.set(r.practicalId, [...(byPractical.get(r.practicalId) ?? []), r])
  const best = practicals.map((p) => ({ p, runs: byPractical.get(p.id) ?? [] }))
    .filter((x) => x.runs.length).sort((a, b) => b.runs.length - a.runs.length)[0]
  if (!best) return null
  const smiles = [...new Set(best.runs.flatMap((r) => (r.molePercents ?? []).map((m) => m.smiles)))]
  const percents = smiles.map((s) => ({
    smiles: s,
    percent: Math.round(medianOf(best.runs.map((r) => r.molePercents?.find((m) => m.smiles === s)?.percent ?? 0)) * 10) / 10,
  }))
  return {
    practical: { id: best.p.id, title: best.p.title, courseCode: best.p.code, term: best.p.term },
    substrate: { name: best.p.name, smiles: best.p.smiles },
    n: best.runs.length,
    percents,
  }
}
