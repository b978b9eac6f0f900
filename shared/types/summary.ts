import { z } from 'zod'

export const summaryQuerySchema = z.object({
  method: z.enum(['grubbs', 'dixon', 'modified-z']).optional(),
  /** Leave the flagged outliers out of the statistics (a preview; nothing is excluded). */
  withoutOutliers: z.enum(['true', 'false']).transform((v) => v === 'true').optional(),
})

export interface OutlierView {
  submissionId: number
  value: number
  statistic: number
  critical: number
}

/** PRODUCT.md's Stats, plus the spread's other measures and the test that was run. */
export interface FactorStats {
  n: number
  mean: number | null
  sd: number | null
  ci95: [number, number] | null
  median: number | null
  mad: number | null
  outliers: OutlierView[]
  sem: number | null
  q1: number | null
  q3: number | null
  iqr: number | null
  min: number | null
  max: number | null
  /** Geometric mean and its 95 % interval: ratios spread on a log scale. */
  log: { mean: number | null, ci95: [number, number] | null, sd: number | null }
  test: { name: 'grubbs' | 'dixon' | 'modified-z', applied: boolean, note: string | null }
  notes: string[]
  values: Array<{ submissionId: number, sectionId: number, value: number }>
}

export interface FactorSet {
  secondaryToPrimary: FactorStats | null
  tertiaryToPrimary: FactorStats | null
}

export interface PracticalSummary {
  n: number
  factors: FactorSet
  excluded: Array<{ submissionId: number, reason: string }>
  bySection: Array<{ sectionId: number, code: string, n: number, factors: FactorSet }>
  keyFactor: 'secondaryToPrimary' | 'tertiaryToPrimary'
  literature: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  withoutOutliers: boolean
  /** Mean mole % per product over the included results, for observed vs predicted charts; `reference` is null without a reference distribution. */
  distribution: Array<{ smiles: string, label: string, name: string | null, observed: number | null, predicted: number, statistical: number, reference: number | null }>
  /** What the class is compared with: the substrate's reference distribution for the reagent, or the class model. */
  comparison: ComparisonView
}

export interface ComparisonView {
  basis: 'reference' | 'class-model'
  /** To follow "compared with": "the reference distribution from …", "the class model (1° : 2° : 3° per H) …". */
  description: string
  /** The key factor of that expectation. */
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
}
