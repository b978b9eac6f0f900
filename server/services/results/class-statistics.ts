import type { FactorStats } from '#shared/types/summary'
import type { OutlierReport, OutlierSettings } from '#shared/utils/outliers'
import { factorStatistics, outlierReport, type FactorStatsJob } from '../../engines/statistics'
import { runEngine } from '../../utils/engines'

// Up to this many results the class figures take a few milliseconds and are computed inline;
// beyond, in the engine worker (server/engines/statistics.ts says why).
const INLINE_RESULTS = 1000

/** Each job's class figures (shared/utils/class-summary.ts), in order. */
export function classFactorStats(jobs: FactorStatsJob[]): Promise<FactorStats[]> {
  const results = jobs.reduce((n, job) => n + job.values.length, 0)
  return results <= INLINE_RESULTS ? Promise.resolve(factorStatistics(jobs)) : runEngine('factorStatistics', jobs)
}

/** The course's outlier test over a class (shared/utils/outliers.ts). */
export function classOutlierReport(
  values: Array<{ submissionId: number, value: number }>, settings: OutlierSettings,
): Promise<OutlierReport> {
  return values.length <= INLINE_RESULTS
    ? Promise.resolve(outlierReport({ values, settings }))
    : runEngine('outlierReport', { values, settings })
}
