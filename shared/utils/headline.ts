// Which figure leads a class's selectivity, and its interval. A selectivity is a ratio: it
// spreads on a log scale and one botched run can be ten times the rest, so the figure people
// read first is the geometric mean with its back-transformed Student-t interval, which can never
// fall below zero. Where a value is zero or negative there is no log: the median leads, with a
// distribution-free interval from the order statistics, which cannot leave the data's range.
// The arithmetic mean is still given, never leading, and is marked as pulled by outliers while
// flagged runs wait for a reviewer. Pure: engines take plain data and return plain data.
import jStat from 'jstat'
import { StatisticsError, summarize, type Summary } from './statistics'
import { ascending, requireFiniteList } from './lib/moments'
import { HEADLINE_LABELS } from '../types/lib/labels'

export type HeadlineStatistic = 'geometric-mean' | 'median'

// The names pages show sit in shared/types/lib/labels.ts, away from jstat.
export { HEADLINE_LABELS }

export interface HeadlineInterval {
  /** 'log-t': exp(mean of ln x ± t·s/√n). 'order-statistics': x(k) to x(n − k + 1), binomial. */
  method: 'log-t' | 'order-statistics'
  /** The level asked for (0.95). */
  confidence: number
  /** What the interval actually covers: exactly `confidence` for log-t, at least it for ranks. */
  coverage: number
  /** The ranks k and n − k + 1 (1-based) of an order-statistics interval. */
  ranks: [number, number] | null
}

export interface ClassHeadline {
  /** null when there are no results. */
  statistic: HeadlineStatistic | null
  value: number | null
  ci95: [number, number] | null
  interval: HeadlineInterval | null
  n: number
  median: number | null
  /** The arithmetic mean and its Student-t interval: shown, never leading. */
  mean: number | null
  meanCi95: [number, number] | null
  /** Flagged runs still counted that no reviewer has accepted or excluded. */
  unreviewedOutliers: number
  /** True while unreviewed flagged runs pull the arithmetic mean. */
  meanPulledByOutliers: boolean
  /** Why this figure leads, in a sentence. */
  reason: string
  notes: string[]
}

/**
 * Distribution-free interval for the median: the widest-inside ranks k, n − k + 1 whose
 * coverage 1 − 2·P(B ≤ k − 1), B ~ Binomial(n, ½), is at least `confidence`: the sign-test
 * interval (common practice). Needs n ≥ 6 at 95 %; its ends are results, so it stays in the data.
 */
export function medianInterval(
  values: readonly number[],
  confidence = 0.95,
): { ci: [number, number], coverage: number, ranks: [number, number] } | null {
  const xs = requireFiniteList(values, (message) => new StatisticsError(message))
  if (!(confidence > 0 && confidence < 1)) throw new StatisticsError('The confidence level must lie strictly between 0 and 1.')
  const n = xs.length
  const sorted = ascending(xs)
  // P(B ≤ j) for B ~ Binomial(n, ½) is the regularised incomplete beta I_½(n − j, j + 1): stable for large n.
  const lowerTail = (j: number) => (j < 0 ? 0 : j >= n ? 1 : jStat.ibeta(0.5, n - j, j + 1))
  let best: number | null = null
  for (let k = 1; k <= Math.floor(n / 2) + 1 && k <= n - k + 1; k++) {
    if (1 - 2 * lowerTail(k - 1) >= confidence) best = k
    else break
  }
  if (best === null) return null
  return { ci: [sorted[best - 1]!, sorted[n - best]!], coverage: 1 - 2 * lowerTail(best - 1), ranks: [best, n - best + 1] }
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`

export function chooseHeadline(
  values: readonly number[],
  options: {
    unreviewedOutliers?: number
    confidence?: number
    /** summarize() of these values at this confidence, linear and (every value above zero) log: saves two passes. */
    summaries?: { linear: Summary, log: Summary | null }
  } = {},
): ClassHeadline {
  const xs = requireFiniteList(values, (message) => new StatisticsError(message))
  const confidence = options.confidence ?? 0.95
  const unreviewed = Math.max(0, options.unreviewedOutliers ?? 0)
  const linear = options.summaries?.linear ?? summarize(xs, { confidence })
  const notes: string[] = []
  const base = {
    n: xs.length, median: linear.median, mean: linear.mean, meanCi95: linear.ci,
    unreviewedOutliers: unreviewed, meanPulledByOutliers: unreviewed > 0 && linear.mean !== null, notes,
  }
  if (!xs.length) return { ...base, statistic: null, value: null, ci95: null, interval: null, reason: 'No results yet.' }

  if (xs.every((x) => x > 0)) {
    const log = options.summaries?.log ?? summarize(xs, { confidence, logScale: true })
    // The back-transform can overflow for values near the largest double; the median then leads.
    if (log.mean !== null && Number.isFinite(log.mean) && (xs.length < 2 || log.ci !== null)) {
      if (!log.ci) notes.push('An interval needs at least 2 results.')
      return {
        ...base, statistic: 'geometric-mean', value: log.mean, ci95: log.ci,
        interval: log.ci ? { method: 'log-t', confidence, coverage: confidence, ranks: null } : null,
        reason: 'A selectivity is a ratio, so its centre and interval are taken on the log scale (geometric mean, Student t) and cannot fall below zero.',
      }
    }
    notes.push('The values span too many orders of magnitude for the log-scale interval to be represented, so the median leads.')
  }
  const ranks = medianInterval(xs, confidence)
  if (!ranks) {
    const verb = xs.length === 1 ? 'is' : 'are'
    notes.push(
      `A distribution-free ${Math.round(confidence * 100)} % interval for the median needs at least 6 results; there ${verb} ${xs.length}.`,
    )
  }
  const zeroOrBelow = xs.filter((x) => x <= 0).length
  const noLogarithm = `${plural(zeroOrBelow, 'result is', 'results are')} zero or below, which has no logarithm`
  return {
    ...base, statistic: 'median', value: linear.median, ci95: ranks?.ci ?? null,
    interval: ranks
      ? { method: 'order-statistics', confidence, coverage: ranks.coverage, ranks: ranks.ranks }
      : null,
    reason: zeroOrBelow
      ? `${noLogarithm}, so the median leads with an interval from the ranked results.`
      : 'The median leads with an interval from the ranked results.',
  }
}

const f2 = (x: number | null | undefined, digits = 2) => (typeof x === 'number' && Number.isFinite(x) ? x.toFixed(digits) : 'n/a')

/** "Geometric mean 3.52 (95 % CI 3.21 to 3.86)": the same words in e-mails, print and cards. */
export function formatHeadline(h: ClassHeadline, digits = 2): string {
  if (!h.statistic) return 'no results yet'
  const ci = h.ci95 ? ` (95 % CI ${f2(h.ci95[0], digits)} to ${f2(h.ci95[1], digits)})` : ''
  return `${HEADLINE_LABELS[h.statistic]} ${f2(h.value, digits)}${ci}`
}

/** The arithmetic mean, second, with a warning while unreviewed flagged runs pull it. */
export function formatArithmeticMean(h: ClassHeadline, digits = 2): string {
  if (h.mean === null) return 'Arithmetic mean n/a'
  const line = `Arithmetic mean ${f2(h.mean, digits)}`
  if (h.meanPulledByOutliers) {
    const way = h.median !== null && h.mean < h.median ? 'down' : 'up'
    return `${line}, pulled ${way} by ${plural(h.unreviewedOutliers, 'flagged run')} no reviewer has decided on yet`
  }
  if (!h.meanCi95) return line
  // A Student-t interval of a skewed ratio can reach below zero, which a selectivity cannot.
  if (h.meanCi95[0] < 0 && h.statistic === 'geometric-mean') return `${line} (its interval reaches below zero: a few large values drive it)`
  return `${line} (95 % CI ${f2(h.meanCi95[0], digits)} to ${f2(h.meanCi95[1], digits)})`
}
