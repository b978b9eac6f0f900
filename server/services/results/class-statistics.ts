import type { FactorStats } from '#shared/types/summary'
import type { OutlierReport, OutlierSettings } from '#shared/utils/outliers'
import { factorStatistics, outlierReport, type FactorStatsJob } from '../../engines/statistics'
import { sizedMemo } from '../../engines/memo'
import { runEngine } from '../../utils/engines'

// Up to this many results the class figures take a few milliseconds and are computed inline;
// beyond, in the engine worker (server/engines/statistics.ts says why).
export const INLINE_RESULTS = 1000

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

// A class's figures depend only on its values and the settings, and the outlier tests over
// 20,000 results take a good part of a second in the engine worker. Pages read the summary far
// more often than results change, so figures are kept per key: the caller's key names every
// value computed from (or a fingerprint that changes with them, class-columns.ts), so a new or
// changed result is a new key, never a stale answer. Bounded by the values held.
const rememberFigures = sizedMemo(200_000)

export function rememberedClassFigures<T>(key: string, size: number, compute: () => Promise<T>): Promise<T> {
  return rememberFigures(key, size, compute)
}
