// A practical's class summary (the contract of GET /api/practicals/:id/summary) from the class's
// columns as PostgreSQL shaped them (server/services/results/class-columns.ts). Pure, so it runs
// inline for a small class and in the engine worker for a large one, where reading 20,000
// results, the outlier tests and writing a 1.5 MB answer would otherwise hold the request loop.
import type { FactorSet, FactorStats, PracticalSummary } from '../../shared/types/summary'
import type { SubmissionStatus } from '../database/schema'
import { factorStats, type FactorValue } from '../../shared/utils/class-summary'
import type { OutlierSettings } from '../../shared/utils/outliers'
import { keyFactorValue, type KeyFactor } from '../../shared/utils/key-factor'
import { sizedMemo } from './memo'

/** The class as one document of arrays, in unit order (class-columns.ts builds it). */
export interface ClassColumns {
  ids: number[] | null
  sectionIds: number[] | null
  statuses: SubmissionStatus[] | null
  /** A stored NaN or infinity arrives as a string and is left out of the figures with a note. */
  secondary: Array<number | string | null> | null
  tertiary: Array<number | string | null> | null
  /** Whether each was excluded by a reviewer. */
  excluded: boolean[] | null
  excludedRows: Array<{ submissionId: number, sectionId: number, exclusionReason: string | null }> | null
  /** Percents of each product SMILES over the results not excluded. */
  percents: Array<{ smiles: string, percents: number[] }> | null
}

/** What the summary takes from the practical's chemistry, products' shares already looked up. */
export interface SummaryChemistry {
  products: Array<{ smiles: string, label: string, name: string | null, predicted: number, statistical: number, reference: number | null }>
  has: Record<KeyFactor, boolean>
  keyFactor: KeyFactor
  literature: PracticalSummary['literature']
  literatureSource: string | null
  comparison: PracticalSummary['comparison']
}

export interface ClassSummaryInput {
  /** ClassColumns as JSON text: parsed here, off the request loop. */
  columns: string
  /** The sections running the practical ({ id, code }, code order), as JSON text. */
  sections: string
  /** Changes with every value the figures read (class-columns.ts): the key of remembered figures. */
  fingerprint: string
  chemistry: SummaryChemistry
  settings: OutlierSettings
  withoutOutliers: boolean
  /** The caller's sections: the by-section part holds only these. */
  sectionIds: number[]
  /** Whose exclusion reasons the caller reads: every section's, or these sections'. */
  reasonsFor: 'all' | number[]
}

interface ClassRow {
  submissionId: number
  sectionId: number
  status: SubmissionStatus
  factorSecondary: number | string | null
  factorTertiary: number | string | null
  excluded: boolean
}

function rowsOf(columns: ClassColumns): ClassRow[] {
  const ids = columns.ids ?? []
  return ids.map((submissionId, i) => ({
    submissionId,
    sectionId: columns.sectionIds![i]!,
    status: columns.statuses![i]!,
    factorSecondary: columns.secondary![i] ?? null,
    factorTertiary: columns.tertiary![i] ?? null,
    excluded: columns.excluded![i]!,
  }))
}

// The figures of a group (the class, a section) depend on its values and the settings alone;
// a TA's answer and the instructor's share them. Kept per thread, bounded by the values held.
const rememberGroup = sizedMemo(400_000)

/** One group's figures for one factor: the shared/utils/class-summary.ts engine, as before. */
function groupStats(rows: ClassRow[], key: KeyFactor, input: ClassSummaryInput, group: string): FactorStats {
  const memoKey = JSON.stringify([input.fingerprint, input.settings, input.withoutOutliers, key, group])
  return rememberGroup(memoKey, rows.length, () => {
    // A flagged run no reviewer has accepted yet is what "pulls the mean" in the headline.
    const unreviewed = new Set(rows.filter((r) => r.status === 'pending').map((r) => r.submissionId))
    const values = rows.flatMap((r): FactorValue[] => {
      const value = keyFactorValue(r, key)
      return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value: value as number }]
    })
    return factorStats(values, input.settings, { withoutOutliers: input.withoutOutliers, unreviewed })
  })
}

function factorSet(rows: ClassRow[], input: ClassSummaryInput, group: string): FactorSet {
  const of = (key: KeyFactor) => (input.chemistry.has[key] ? groupStats(rows, key, input, group) : null)
  return { secondaryToPrimary: of('secondaryToPrimary'), tertiaryToPrimary: of('tertiaryToPrimary') }
}

/** The class-wide figures for everyone who may see the practical; by section, the caller's sections. */
export function classSummary(input: ClassSummaryInput): PracticalSummary {
  const columns = JSON.parse(input.columns) as ClassColumns
  const allSections = JSON.parse(input.sections) as Array<{ id: number, code: string }>
  const { chemistry } = input
  const included = rowsOf(columns).filter((r) => !r.excluded)
  const sections = allSections.filter((s) => input.sectionIds.includes(s.id))
  const percentsOf = new Map((columns.percents ?? []).map((p) => [p.smiles, p.percents]))
  const distribution = chemistry.products.map((p) => {
    const xs = percentsOf.get(p.smiles) ?? []
    return {
      smiles: p.smiles,
      label: p.label,
      name: p.name,
      observed: xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null,
      predicted: p.predicted,
      statistical: p.statistical,
      reference: p.reference,
    }
  })
  const bySection = new Map<number, ClassRow[]>(sections.map((s) => [s.id, []]))
  for (const r of included) bySection.get(r.sectionId)?.push(r)
  const factors = factorSet(included, input, 'class')
  const key = factors[chemistry.keyFactor]
  // A reviewer's reason can name a student or their mistake: only the course's instructors and
  // the TAs of that run's section read it; everyone else learns only that a reviewer left it out.
  const reads = (sectionId: number) => input.reasonsFor === 'all' || input.reasonsFor.includes(sectionId)
  return {
    n: included.length,
    headline: key ? { factor: chemistry.keyFactor, ...key.headline } : null,
    factors,
    excluded: (columns.excludedRows ?? []).map((r) => ({
      submissionId: r.submissionId,
      reason: reads(r.sectionId) ? r.exclusionReason ?? '' : 'Left out of the class figures by a reviewer.',
    })),
    bySection: sections.map((s) => {
      const rows = bySection.get(s.id)!
      return { sectionId: s.id, code: s.code, n: rows.length, factors: factorSet(rows, input, `section:${s.id}`) }
    }),
    keyFactor: chemistry.keyFactor,
    literature: chemistry.literature,
    literatureSource: chemistry.literatureSource,
    withoutOutliers: input.withoutOutliers,
    distribution,
    comparison: chemistry.comparison,
  }
}

/**
 * The summary as the JSON the route sends, written where it was computed, as UTF-8 bytes: sent
 * as they are, every time, with nothing to encode or measure again on the request loop.
 */
export function classSummaryJson(input: ClassSummaryInput): Uint8Array {
  return new TextEncoder().encode(JSON.stringify(classSummary(input)))
}
