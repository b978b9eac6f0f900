// Class statistics for one factor: the summary, on a log scale too, the course's outlier test,
// and the figure that leads (shared/utils/headline.ts).
import { summarize } from './statistics'
import { findOutliers, type OutlierSettings } from './outliers'
import { chooseHeadline } from './headline'
import type { FactorStats } from '../types/summary'

export interface FactorValue {
  submissionId: number
  sectionId: number
  value: number
}

export interface FactorStatsOptions {
  /** Leave what the test flags out of the figures (a preview). */
  withoutOutliers?: boolean
  /** Submissions no reviewer has accepted yet: a flagged one among them pulls the mean. */
  unreviewed?: ReadonlySet<number>
}

export function factorStats(values: FactorValue[], settings: OutlierSettings, options: FactorStatsOptions = {}): FactorStats {
  // A stored factor PostgreSQL reads back as NaN or beyond a double cannot be summarised: listed, not counted.
  const finite = values.filter((v) => Number.isFinite(v.value))
  const dropped = values.length - finite.length
  const report = findOutliers(finite, settings)
  const flagged = new Set(report.outliers.map((o) => o.submissionId))
  const used = options.withoutOutliers ? finite.filter((v) => !flagged.has(v.submissionId)) : finite
  const xs = used.map((v) => v.value)
  const s = summarize(xs)
  const positive = xs.every((x) => x > 0)
  const log = xs.length && positive ? summarize(xs, { logScale: true }) : null
  const unreviewedOutliers = used.filter((v) => flagged.has(v.submissionId) && (options.unreviewed?.has(v.submissionId) ?? false)).length
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
    test: { name: report.test, applied: report.applied, note: report.note, maxOutliers: report.maxOutliers },
    headline: chooseHeadline(xs, { unreviewedOutliers, summaries: { linear: s, log } }),
    notes: [
      ...s.notes,
      ...(xs.length && !positive ? ['Some values are zero or negative, so no log-scale summary.'] : []),
      ...(dropped ? [droppedNote(dropped)] : []),
    ],
    values: used,
  }
}

function droppedNote(dropped: number): string {
  return dropped === 1
    ? '1 stored result is not a finite number and is left out.'
    : `${dropped} stored results are not finite numbers and are left out.`
}
