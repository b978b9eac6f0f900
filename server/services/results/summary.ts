import type { PracticalScope } from '../../utils/access'
import type { FactorSet, PracticalSummary } from '#shared/types/summary'
import type { FactorValue } from '#shared/utils/class-summary'
import type { OutlierSettings } from '#shared/utils/outliers'
import type { OutlierTestName } from '#shared/types/course'
import { classColumns, type ClassFigureRow } from './class-columns'
import type { FactorStatsJob } from '../../engines/statistics'
import { keyFactorValue, type KeyFactor } from '#shared/utils/key-factor'
import { classFactorStats, rememberedClassFigures } from './class-statistics'
import { practicalChemistry, referenceShare } from '../submissions/practical-chemistry'

/** The class figures of each group of rows (the whole class, then each section), computed together. */
async function factorSets(
  groups: ClassFigureRow[][], settings: OutlierSettings, has: Record<KeyFactor, boolean>, withoutOutliers: boolean,
): Promise<FactorSet[]> {
  const keys = (['secondaryToPrimary', 'tertiaryToPrimary'] as const).filter((k) => has[k])
  const jobs: FactorStatsJob[] = groups.flatMap((rows) => {
    // A flagged run no reviewer has accepted yet is what "pulls the mean" in the headline.
    const unreviewed = rows.filter((r) => r.status === 'pending').map((r) => r.submissionId)
    return keys.map((key) => ({
      values: rows.flatMap((r): FactorValue[] => {
        const value = keyFactorValue(r, key)
        return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value }]
      }),
      settings, withoutOutliers, unreviewed,
    }))
  })
  const stats = await classFactorStats(jobs)
  return groups.map((_, g) => {
    const of = (key: KeyFactor) => (has[key] ? stats[g * keys.length + keys.indexOf(key)]! : null)
    return { secondaryToPrimary: of('secondaryToPrimary'), tertiaryToPrimary: of('tertiaryToPrimary') }
  })
}

/**
 * A reviewer's reason can name a student or their mistake: only the course's instructors and the
 * TAs of that run's section read it; everyone else learns only that a reviewer left it out.
 */
function exclusionReasonFor(scope: PracticalScope, row: { sectionId: number, exclusionReason: string | null }): string {
  const reads = scope.role === 'owner' || (scope.role === 'ta' && (scope.sectionIds ?? []).includes(row.sectionId))
  return reads ? row.exclusionReason ?? '' : 'Left out of the class figures by a reviewer.'
}

/**
 * The class-wide selectivity of a practical: every unit's latest accepted-or-pending result,
 * excluded ones left out and listed. The whole class is summarised for everyone who may see
 * the practical; the by-section part holds only the caller's sections.
 */
export async function practicalSummary(
  scope: PracticalScope, options: { method?: OutlierTestName, withoutOutliers?: boolean, maxOutliers?: number },
): Promise<PracticalSummary> {
  const [chemistry, { rows, excluded, percentsOf, sections: allSections, fingerprint }] = await Promise.all([
    practicalChemistry(scope.practical), classColumns(scope.practical.id)])
  const included = rows.filter((r) => !r.excluded)
  const settings: OutlierSettings = {
    test: options.method ?? scope.course.outlierTest,
    alpha: scope.course.outlierAlpha,
    zscoreLimit: scope.course.zscoreLimit,
    maxOutliers: options.maxOutliers ?? null,
  }
  const has = {
    secondaryToPrimary: chemistry.products.some((p) => p.carbonClass === 'secondary'),
    tertiaryToPrimary: chemistry.products.some((p) => p.carbonClass === 'tertiary'),
  }
  const withoutOutliers = options.withoutOutliers ?? false
  const sections = allSections.filter((s) => scope.sessionSectionIds.includes(s.id))

  const distribution = chemistry.products.map((p) => {
    const xs = percentsOf.get(p.smiles) ?? []
    return {
      smiles: p.smiles,
      label: p.label,
      name: p.name,
      observed: xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null,
      predicted: chemistry.predicted.find((x) => x.smiles === p.smiles)?.percent ?? 0,
      statistical: chemistry.statistical.find((x) => x.smiles === p.smiles)?.percent ?? 0,
      reference: referenceShare(chemistry, p.smiles),
    }
  })
  const bySectionRows = sections.map((s) => included.filter((r) => r.sectionId === s.id))
  // The figures' inputs: the values (fingerprint), the settings, which factors apply, the groups.
  const figuresKey = JSON.stringify([fingerprint, settings, has, withoutOutliers, sections.map((s) => s.id)])
  const [factors, ...sectionFactors] = await rememberedClassFigures(figuresKey, 2 * included.length,
    () => factorSets([included, ...bySectionRows], settings, has, withoutOutliers))
  const key = factors![chemistry.keyFactor]
  return {
    n: included.length,
    headline: key ? { factor: chemistry.keyFactor, ...key.headline } : null,
    factors: factors!,
    excluded: excluded.map((r) => ({ submissionId: r.submissionId, reason: exclusionReasonFor(scope, r) })),
    bySection: sections.map((s, i) => ({ sectionId: s.id, code: s.code, n: bySectionRows[i]!.length, factors: sectionFactors[i]! })),
    keyFactor: chemistry.keyFactor,
    literature: chemistry.literature,
    literatureSource: chemistry.literatureSource ?? null,
    withoutOutliers,
    distribution,
    comparison: { basis: chemistry.expected.basis, description: chemistry.expected.description, factors: chemistry.expected.factors },
  }
}
