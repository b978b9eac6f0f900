import type { SessionUser } from '#shared/types/auth'
import type { Substrate } from '../../database/schema'
import { REAGENT_HALOGEN, type LibraryReagent, type ReferenceCandidate, type ReferenceInput,
  type ReferenceView } from '#shared/types/library'
import { messageExcerpt } from '#shared/utils/text-input'
import { latestUnitVersions, storedMolePercents } from '../results'
import { useDb } from '../../utils/db'
import { invalid } from '../../utils/validation'
import { substrateAnalysis } from './chemistry-cache'
import { canonicalOrInvalid } from './substrate-products'

// Reference distributions of a substrate: what its product mixture really looks like with one
// reagent family, read by the library page, written by its owner, and filled from the course's
// own accepted results.

/** Every reference distribution of a substrate, in reagent order. */
export async function substrateReferenceViews(substrateId: number): Promise<ReferenceView[]> {
  const rows = await useDb().selectFrom('substrateReferences').leftJoin('users', 'users.id', 'substrateReferences.updatedBy')
    .select(['substrateReferences.reagent', 'substrateReferences.percents', 'substrateReferences.source', 'substrateReferences.sourceKind',
      'substrateReferences.updatedAt', 'users.name as updatedBy'])
    .where('substrateReferences.substrateId', '=', substrateId).orderBy('substrateReferences.reagent').execute()
  return rows.map((r) => ({
    reagent: r.reagent, halogen: REAGENT_HALOGEN[r.reagent], percents: r.percents, source: r.source, sourceKind: r.sourceKind,
    updatedBy: r.updatedBy, updatedAt: r.updatedAt.toISOString(),
  }))
}

/**
 * The percentages to store: each product of the reagent's halogen exactly once (any SMILES
 * spelling, stored canonical), naming the row of anything else.
 */
export async function resolveReferencePercents(input: Pick<ReferenceInput, 'percents'>, substrate: Pick<Substrate, 'smiles' | 'name'>,
  reagent: LibraryReagent): Promise<Array<{ smiles: string, percent: number }>> {
  const products = (await substrateAnalysis(substrate.smiles, REAGENT_HALOGEN[reagent])).products.map((p) => p.smiles)
  const forms = await canonicalOrInvalid(input.percents.map((p, i) => ({ smiles: p.productSmiles, field: `percents.${i}.productSmiles` })))
  const seen = new Map<string, number>()
  const rows = input.percents.map((p, i) => {
    const field = `percents.${i}.productSmiles`
    const smiles = forms[i]!
    if (!products.includes(smiles)) invalid([{ field,
      message: `“${messageExcerpt(p.productSmiles, 60)}” is not a product of ${substrate.name} with this reagent` }])
    if (seen.has(smiles)) invalid([{ field, message: `${smiles} is listed twice (rows ${seen.get(smiles)! + 1} and ${i + 1})` }])
    seen.set(smiles, i)
    return { smiles, percent: p.percent }
  })
  const missing = products.filter((s) => !seen.has(s))
  if (missing.length) invalid([{ field: 'percents', message: `Give the mol % of every product; missing: ${missing.join(', ')}` }])
  return rows
}

/**
 * Practicals of the caller's own courses that ran this substrate (by structure: a copy counts)
 * and have accepted results, with the mean mol % per product over each work unit's latest
 * accepted version that no reviewer excluded.
 */
export async function referenceCandidates(me: SessionUser, substrate: Pick<Substrate, 'smiles'>): Promise<ReferenceCandidate[]> {
  const db = useDb()
  const practicals = await db.selectFrom('practicals')
    .innerJoin('courseOwners', 'courseOwners.courseId', 'practicals.courseId')
    .innerJoin('courses', 'courses.id', 'practicals.courseId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .select(['practicals.id', 'practicals.title', 'courses.code', 'courses.term', 'methods.reagent', 'methods.name as methodName'])
    .where('courseOwners.userId', '=', me.id).where('substrates.smiles', '=', substrate.smiles)
    .orderBy('practicals.id', 'desc').execute()
  if (!practicals.length) return []
  const rows = await latestUnitVersions(db, practicals.map((p) => p.id), { statuses: ['accepted'], skipExcluded: true })
    .select(['s.practicalId', storedMolePercents.as('molePercents')]).execute()
  const candidates: ReferenceCandidate[] = []
  for (const p of practicals) {
    const runs = rows.filter((r) => r.practicalId === p.id)
    if (!runs.length) continue
    const products = (await substrateAnalysis(substrate.smiles, REAGENT_HALOGEN[p.reagent])).products.map((x) => x.smiles)
    const percents = products.map((smiles) => ({
      smiles,
      percent: runs.reduce((sum, r) => sum + (r.molePercents.find((m) => m.smiles === smiles)?.percent ?? 0), 0) / runs.length,
    }))
    candidates.push({
      practicalId: p.id, title: p.title, courseCode: p.code, term: p.term, reagent: p.reagent, methodName: p.methodName, n: runs.length,
      percents,
      source: `Mean of ${runs.length} accepted result${runs.length === 1 ? '' : 's'}, ${p.code} ${p.term}, "${p.title}"`,
    })
  }
  return candidates
}
