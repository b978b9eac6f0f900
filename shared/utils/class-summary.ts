// Class statistics for one factor: the summary, on a log scale too, and the course's outlier test.
import { summarize } from './statistics'
import { findOutliers, type OutlierSettings } from './outliers'
import type { FactorStats } from '../types/summary'

export interface FactorValue {
  submissionId: number
  sectionId: number
  value: number
}

export function factorStats(values: FactorValue[], settings: OutlierSettings, options: { withoutOutliers?: boolean } = {}): FactorStats {
  const report = findOutliers(values, settings)
  const flagged = new Set(report.outliers.map((o) => o.submissionId))
  const used = options.withoutOutliers ? values.filter((v) => !flagged.has(v.submissionId)) : values
  const xs = used.map((v) => v.value)
  const s = summarize(xs)
  const positive = xs.every((x) => x > 0)
  const log = xs.length && positive ? summarize(xs, { logScale: true }) : null
  return {
    n: s.n,
    mean: s.mean,
    sd: s.sd,
    ci95: s.ci,
    median: s.median,
    mad: s.mad,
    outliers: report.outliers,
    sem: s.sem,
    q1: s.q1,
    q3: s.q3,
    iqr: s.iqr,
    min: s.min,
    max: s.max,
    log: { mean: log?.mean ?? null, ci95: log?.ci ?? null, sd: log?.sd ?? null },
    test: { name: report.test, applied: report.applied, note: report.note },
    notes: [...s.notes, ...(xs.length && !positive ? ['Some values are zero or negative, so no log-scale summary.'] : [])],
    values: used,
  }
}
