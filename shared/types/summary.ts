import { z } from 'zod'
import { OUTLIER_TESTS, type OutlierTestName } from './course'
import type { ClassHeadline } from '../utils/headline'
import type { KeyFactor } from '../utils/key-factor'

export const summaryQuerySchema = z.object({
  method: z.enum(OUTLIER_TESTS).optional(),
  /** Leave the flagged outliers out of the statistics (a preview; nothing is excluded). */
  withoutOutliers: z.enum(['true', 'false']).transform((v) => v === 'true').optional(),
  /** Generalized ESD: the most outliers to look for (r); by default one in five, at least 2. */
  maxOutliers: z.coerce.number({ error: 'Enter a whole number' }).int('Enter a whole number')
    .min(1, 'At least 1').max(1000, 'At most 1000').optional(),
})

export interface OutlierView {
  submissionId: number
  value: number
  statistic: number
  critical: number
  /** Generalized ESD: the step that removed the value. */
  step?: number
}

/**
 * PRODUCT.md's Stats, plus the spread's other measures, the test that was run and the figure
 * that leads (`headline`: geometric mean, or the median when a value is zero or below).
 */
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
  /** applied: false means the test could not run (see note), not "no outliers". */
  test: { name: OutlierTestName, applied: boolean, note: string | null, maxOutliers: number | null }
  headline: ClassHeadline
  notes: string[]
  values: Array<{ submissionId: number, sectionId: number, value: number }>
}

export interface FactorSet {
  secondaryToPrimary: FactorStats | null
  tertiaryToPrimary: FactorStats | null
}

/** The key factor's headline, the one figure a page, e-mail or card leads with. */
export type SummaryHeadline = ClassHeadline & { factor: KeyFactor }

export interface PracticalSummary {
  n: number
  headline: SummaryHeadline | null
  factors: FactorSet
  excluded: Array<{ submissionId: number, reason: string }>
  bySection: Array<{ sectionId: number, code: string, n: number, factors: FactorSet }>
  keyFactor: KeyFactor
  literature: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  /** Whence the literature factors: the method, its temperature and its source, as a reader's reference. */
  literatureSource: string | null
  withoutOutliers: boolean
  /**
   * Mean mole % per product over the included results, for observed vs predicted charts;
   * `reference` is null without a reference distribution.
   */
  distribution: Array<{
    smiles: string
    label: string
    name: string | null
    observed: number | null
    predicted: number
    statistical: number
    reference: number | null
  }>
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
