import type { PracticalScope } from '../../utils/access'
import type { CrossTermComparison, CrossTermRow, CrossTermStats } from '#shared/types/results'
import { summarize } from '#shared/utils/statistics'
import { chooseHeadline } from '#shared/utils/headline'
import { keyFactorValue } from '#shared/utils/key-factor'
import { latestUnitVersions } from './latest-versions'
import { practicalChemistry } from '../submissions/practical-chemistry'
import { useDb } from '../../utils/db'

interface CrossTermResultRow {
  practicalId: number
  sectionCode: string
  value: number
}

function crossTermStats(stored: number[]): CrossTermStats {
  const values = stored.filter(Number.isFinite)
  const s = summarize(values)
  return { n: s.n, mean: s.mean, sd: s.sd, ci95: s.ci, median: s.median, headline: chooseHeadline(values) }
}

/**
 * The same substrate (canonical SMILES, as the library stores it) with the same kind of method
 * (reagent and halogen), in every course and term: the key factor over each unit's latest
 * accepted-or-pending, not excluded result. Aggregates only, never who.
 */
export async function crossTermComparison(scope: PracticalScope): Promise<CrossTermComparison> {
  const db = useDb()
  const chemistry = await practicalChemistry(scope.practical)
  const reference = await db.selectFrom('practicals')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .select(['substrates.smiles', 'substrates.name', 'methods.reagent', 'methods.halogen'])
    .where('practicals.id', '=', scope.practical.id).executeTakeFirstOrThrow()
  const practicals = await db.selectFrom('practicals')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .select((eb) => [
      'practicals.id', 'courses.code', 'courses.term',
      eb.selectFrom('practicalSessions').select((e) => e.fn.min('meetingDate').as('m'))
        .whereRef('practicalSessions.practicalId', '=', 'practicals.id').as('firstMeeting'),
    ])
    .where('substrates.smiles', '=', reference.smiles)
    .where('methods.reagent', '=', reference.reagent)
    .where('methods.halogen', '=', reference.halogen)
    .execute()
  const ids = practicals.map((p) => p.id)
  const sections = await db.selectFrom('practicalSessions').innerJoin('sections', 'sections.id', 'practicalSessions.sectionId')
    .select(['practicalSessions.practicalId', 'sections.code'])
    .where('practicalSessions.practicalId', 'in', ids).orderBy('sections.code').execute()
  // One pass over every matching practical: each unit's newest accepted-or-pending version.
  const latest = await latestUnitVersions(db, ids).innerJoin('sections as sec', 'sec.id', 's.sectionId')
    .select(['s.practicalId', 'sec.code as sectionCode', 's.excludedAt', 's.factorSecondary', 's.factorTertiary'])
    .execute()
  const rows: CrossTermResultRow[] = latest.flatMap((r) => {
    const value = keyFactorValue(r, chemistry.keyFactor)
    return r.excludedAt === null && value !== null ? [{ practicalId: r.practicalId, sectionCode: r.sectionCode, value }] : []
  })

  const result: CrossTermRow[] = practicals.map((p) => {
    const mine = rows.filter((r) => r.practicalId === p.id)
    const codes = [...new Set(sections.filter((s) => s.practicalId === p.id).map((s) => s.code))]
    return {
      practicalId: p.id,
      courseCode: p.code,
      term: p.term,
      firstMeeting: (p.firstMeeting as string | null) ?? null,
      sectionCodes: codes,
      ...crossTermStats(mine.map((r) => Number(r.value))),
      sections: codes.map((code) => ({ code, ...crossTermStats(mine.filter((r) => r.sectionCode === code).map((r) => Number(r.value))) })),
      current: p.id === scope.practical.id,
    }
  })
  result.sort((a, b) => (a.firstMeeting ?? '9999').localeCompare(b.firstMeeting ?? '9999') || a.practicalId - b.practicalId)
  return {
    keyFactor: chemistry.keyFactor,
    substrate: reference.name,
    reagent: reference.reagent,
    literature: chemistry.literature[chemistry.keyFactor],
    rows: result,
  }
}
