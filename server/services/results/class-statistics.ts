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

// A class's figures depend only on its values and the settings, and the generalized ESD test
// over 20,000 results takes about a second in the engine worker. Pages read the summary far
// more often than results change, so figures are kept per key: the caller's key holds a hash
// of every value computed from (class-columns.ts), so a new or changed result is a new key,
// never a stale answer. Bounded by the values held, oldest first out.
const REMEMBERED_VALUES_LIMIT = 200_000
const remembered = new Map<string, { figures: Promise<unknown>, size: number }>()
let rememberedSize = 0

export function rememberedClassFigures<T>(key: string, size: number, compute: () => Promise<T>): Promise<T> {
  const known = remembered.get(key)
  if (known) return known.figures as Promise<T>
  const figures = compute()
  if (size > REMEMBERED_VALUES_LIMIT) return figures
  while (rememberedSize + size > REMEMBERED_VALUES_LIMIT) {
    const [oldest, entry] = remembered.entries().next().value!
    remembered.delete(oldest)
    rememberedSize -= entry.size
  }
  remembered.set(key, { figures, size })
  rememberedSize += size
  figures.catch(() => {
    if (remembered.get(key)?.figures === figures) {
      remembered.delete(key)
      rememberedSize -= size
    }
  })
  return figures
}
