// Class statistics and outlier tests for selectivity factors. Pure; jstat only for the t
// distribution. Methods: NIST/SEMATECH e-Handbook §1.3.5.17 (Grubbs, per ASTM E178),
// Rorabacher, Anal. Chem. 63 (1991) 139 (Dixon r10), Iglewicz & Hoaglin (modified z).
import jStat from 'jstat'
import {
  ascending, madOf, meanOf as mean, medianOf, quantileOf as quantile, requireFiniteList, sampleSdOf as sampleSd, tameScale,
} from './lib/moments'

export class StatisticsError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'StatisticsError'
  }
}

/** Quantile p of Student's t with df degrees of freedom (p = 0.975 gives the two-sided 95 % value). */
export function tCritical(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new StatisticsError('The probability must lie strictly between 0 and 1.')
  if (!(df > 0) || !Number.isFinite(df)) throw new StatisticsError('The degrees of freedom must be positive.')
  return jStat.studentt.inv(p, df)
}

const finiteValues = (values: readonly number[]) => requireFiniteList(values, (message) => new StatisticsError(message))

export interface Summary {
  n: number
  scale: 'linear' | 'log'
  /** Arithmetic mean, or the geometric mean on a log scale. */
  mean: number | null
  /** Sample SD (n − 1); on a log scale, of the natural logs. */
  sd: number | null
  sem: number | null
  /** Student-t interval for the mean (geometric on a log scale). */
  ci: [number, number] | null
  confidence: number
  median: number | null
  /** Raw median absolute deviation from the median (not scaled by 1.4826). */
  mad: number | null
  q1: number | null
  q3: number | null
  iqr: number | null
  min: number | null
  max: number | null
  /** SD / mean; on a log scale the geometric CV, √(exp(sd²) − 1). */
  cv: number | null
  /** Why some fields are null. */
  notes: string[]
}

const TOO_LARGE_NOTE = 'Some figures are beyond the largest number a computer holds (about 1.8e308), so they are left blank.'

/** Every figure that overflowed becomes null, with one note saying why. */
function withoutOverflow(s: Summary): Summary {
  const keys = ['mean', 'sd', 'sem', 'median', 'mad', 'q1', 'q3', 'iqr', 'min', 'max', 'cv'] as const
  const out: Summary = { ...s }
  let lost = false
  for (const k of keys) {
    const v = out[k]
    if (v !== null && !Number.isFinite(v)) { out[k] = null; lost = true }
  }
  if (out.ci && !out.ci.every(Number.isFinite)) { out.ci = null; lost = true }
  return lost ? { ...out, notes: [...out.notes, TOO_LARGE_NOTE] } : out
}

export function summarize(values: readonly number[], options: { confidence?: number, logScale?: boolean } = {}): Summary {
  const xs = finiteValues(values)
  const confidence = options.confidence ?? 0.95
  if (!(confidence > 0 && confidence < 1)) throw new StatisticsError('The confidence level must lie strictly between 0 and 1.')
  const logScale = options.logScale ?? false
  const n = xs.length
  const empty: Summary = {
    n, scale: logScale ? 'log' : 'linear', mean: null, sd: null, sem: null, ci: null, confidence,
    median: null, mad: null, q1: null, q3: null, iqr: null, min: null, max: null, cv: null, notes: [],
  }
  if (n === 0) return { ...empty, notes: ['No values.'] }
  if (logScale && xs.some((v) => v <= 0)) return { ...empty, notes: ['A log-scale summary needs values above zero.'] }
  // Linear figures are computed on tamed values and multiplied back; logs never overflow.
  // Order statistics come from the values themselves (quantile() cannot overflow).
  const { values: tamed, scale } = logScale ? { values: xs, scale: 1 } : tameScale(xs)
  const unit = (v: number) => v * scale
  const sorted = ascending(xs)
  const median = quantile(sorted, 0.5)
  const q1 = quantile(sorted, 0.25)
  const q3 = quantile(sorted, 0.75)
  const base = { ...empty, median, mad: madOf(xs, median), q1, q3, iqr: q3 - q1, min: sorted[0]!, max: sorted[n - 1]! }
  const work = logScale ? xs.map(Math.log) : tamed
  const m = mean(work)
  const back = (v: number) => (logScale ? Math.exp(v) : unit(v))
  if (n === 1) return withoutOverflow({ ...base, mean: back(m), notes: ['The SD and confidence interval need at least 2 values.'] })
  const sd = sampleSd(work)
  const sem = sd / Math.sqrt(n)
  const t = tCritical(1 - (1 - confidence) / 2, n - 1)
  const notes: string[] = []
  if (n < 3) notes.push('With 2 values the interval is very wide (t has 1 degree of freedom).')
  let cv: number | null
  if (logScale) cv = Math.sqrt(Math.exp(sd * sd) - 1)
  else if (m !== 0) cv = sd / Math.abs(m)
  else { cv = null; notes.push('The CV is undefined because the mean is zero.') }
  return withoutOverflow({
    ...base,
    mean: back(m),
    sd: logScale ? sd : unit(sd),
    sem: logScale ? sem : unit(sem),
    ci: [back(m - t * sem), back(m + t * sem)],
    cv,
    notes,
  })
}

export interface GrubbsStep {
  n: number
  index: number
  value: number
  mean: number
  sd: number
  G: number
  critical: number
  outlier: boolean
}

export interface GrubbsResult {
  outliers: number[]
  steps: GrubbsStep[]
  alpha: number
  twoSided: boolean
  note: string | null
}

/**
 * NIST/SEMATECH e-Handbook §1.3.5.17.1: Grubbs' test "should not be used for sample sizes of six
 * or fewer since it frequently tags most of the points as outliers". It still runs, with this note.
 */
export const GRUBBS_SMALL_N = 6
const GRUBBS_SMALL_NOTE = "With 6 or fewer results Grubbs' test is unreliable: it tends to tag most of the points as outliers (NIST/SEMATECH e-Handbook)."

/**
 * Grubbs' test (ASTM E178). G = max|x − mean| / s; critical value
 * G = (n − 1)/√n · √(t² / (n − 2 + t²)), t the upper α/(2n) (two-sided) or α/n (one-sided)
 * quantile with n − 2 df. Iterative: remove the outlier and test again while n ≥ 3.
 */
export function grubbsTest(
  values: readonly number[],
  options: { alpha?: number, twoSided?: boolean, iterative?: boolean, side?: 'high' | 'low' } = {},
): GrubbsResult {
  const xs = finiteValues(values)
  const alpha = options.alpha ?? 0.05
  if (!(alpha > 0 && alpha < 1)) throw new StatisticsError('α must lie strictly between 0 and 1.')
  const twoSided = options.twoSided ?? true
  const iterative = options.iterative ?? true
  const result: GrubbsResult = { outliers: [], steps: [], alpha, twoSided, note: null }
  // G is a ratio: tamed values give the same G without overflowing (lib/moments.ts).
  const { values: tamed, scale } = tameScale(xs)
  let remaining = tamed.map((value, index) => ({ value, index }))
  while (remaining.length >= 3) {
    const n = remaining.length
    const vals = remaining.map((r) => r.value)
    const m = mean(vals)
    const sd = sampleSd(vals)
    if (sd === 0) { result.note = 'All remaining values are equal, so none can be an outlier.'; break }
    const score = (v: number) => (
      twoSided ? Math.abs(v - m) : options.side === 'low' ? m - v : options.side === 'high' ? v - m : Math.abs(v - m)
    )
    const suspect = remaining.reduce((best, r) => (score(r.value) > score(best.value) ? r : best))
    const G = score(suspect.value) / sd
    const t = tCritical(1 - (twoSided ? alpha / (2 * n) : alpha / n), n - 2)
    const critical = ((n - 1) / Math.sqrt(n)) * Math.sqrt((t * t) / (n - 2 + t * t))
    const outlier = G > critical
    result.steps.push({ n, index: suspect.index, value: xs[suspect.index]!, mean: m * scale, sd: sd * scale, G, critical, outlier })
    if (!outlier) break
    result.outliers.push(suspect.index)
    if (!iterative) break
    remaining = remaining.filter((r) => r !== suspect)
  }
  if (xs.length < 3) result.note = "Grubbs' test needs at least 3 values."
  else if (xs.length <= GRUBBS_SMALL_N) result.note = [GRUBBS_SMALL_NOTE, result.note].filter(Boolean).join(' ')
  return result
}

/**
 * Critical r10 values indexed by n − 3 (n = 3…10), Rorabacher, Anal. Chem. 63 (1991) 139.
 * 95 %: as listed in PRODUCT.md. 90 %: from memory, and consistent (±0.004) with a Monte Carlo
 * simulation of r10 under normality. 99 % is left out: the recalled values could not be confirmed.
 */
export const DIXON_R10_CRITICAL: Readonly<Record<string, readonly number[]>> = {
  0.9: [0.941, 0.765, 0.642, 0.56, 0.507, 0.468, 0.437, 0.412],
  0.95: [0.970, 0.829, 0.710, 0.625, 0.568, 0.526, 0.493, 0.466],
}

export interface DixonResult {
  n: number
  /** The larger of the two end ratios (gap / range). */
  q: number
  critical: number
  confidence: number
  /** Index of the suspect value (lowest or highest) in the input. */
  index: number
  value: number
  side: 'low' | 'high'
  outlier: boolean
  note: string | null
}

/** Dixon's Q test, r10 = gap / range for the more extreme end, n = 3…10. */
export function dixonQTest(values: readonly number[], options: { confidence?: number } = {}): DixonResult {
  const xs = finiteValues(values)
  const confidence = options.confidence ?? 0.95
  const table = DIXON_R10_CRITICAL[String(confidence)]
  if (!table) {
    const levels = Object.keys(DIXON_R10_CRITICAL).map((k) => `${Number(k) * 100} %`).join(' and ')
    throw new StatisticsError(`Dixon's Q test is available at ${levels} confidence.`)
  }
  const n = xs.length
  if (n < 3 || n > 10) {
    throw new StatisticsError(
      `Dixon's Q test (r10) needs 3 to 10 values; there are ${n}. Use Grubbs' test or the modified z-score for other sizes.`,
    )
  }
  // Q is a ratio of gaps: tamed values keep the range finite (lib/moments.ts).
  const order = tameScale(xs).values.map((value, index) => ({ value, index })).sort((a, b) => a.value - b.value)
  const range = order[n - 1]!.value - order[0]!.value
  const critical = table[n - 3]!
  if (range === 0) {
    const top = order[n - 1]!.index
    return {
      n, q: 0, critical, confidence, index: top, value: xs[top]!, side: 'high', outlier: false,
      note: 'All values are equal, so none can be an outlier.',
    }
  }
  const low = (order[1]!.value - order[0]!.value) / range
  const high = (order[n - 1]!.value - order[n - 2]!.value) / range
  const side = high >= low ? 'high' : 'low'
  const suspect = side === 'high' ? order[n - 1]! : order[0]!
  const q = Math.max(low, high)
  return { n, q, critical, confidence, index: suspect.index, value: xs[suspect.index]!, side, outlier: q > critical, note: null }
}

export interface ModifiedZResult {
  /** One score per input value; null only when no spread exists at all. */
  scores: (number | null)[]
  outliers: number[]
  median: number | null
  mad: number | null
  threshold: number
  /** 'mad': 0.6745(x − median)/MAD. 'mean-ad': MAD was 0, so 0.7979(x − median)/meanAD. 'none': no spread. */
  method: 'mad' | 'mean-ad' | 'none'
  note: string | null
}

/**
 * Modified z-scores (Iglewicz & Hoaglin), flagged when |M| > threshold (3.5). When more than
 * half the values are identical the MAD is 0; the score then uses the mean absolute deviation
 * from the median, M = (x − median)/(1.2533·meanAD) = 0.7979(x − median)/meanAD (common practice).
 */
export function modifiedZScores(values: readonly number[], options: { threshold?: number } = {}): ModifiedZResult {
  const raw = finiteValues(values)
  const threshold = options.threshold ?? 3.5
  if (!(threshold > 0)) throw new StatisticsError('The threshold must be positive.')
  if (raw.length === 0) return { scores: [], outliers: [], median: null, mad: null, threshold, method: 'none', note: 'No values.' }
  // M is a ratio: tamed values give the same scores without overflowing (lib/moments.ts).
  const { values: xs, scale } = tameScale(raw)
  const med = medianOf(xs)
  const mad = madOf(xs, med)
  let scores: (number | null)[]
  let method: ModifiedZResult['method']
  let note: string | null = null
  if (mad > 0) {
    scores = xs.map((v) => (0.6745 * (v - med)) / mad)
    method = 'mad'
  } else {
    const meanAd = mean(xs.map((v) => Math.abs(v - med)))
    if (meanAd > 0) {
      scores = xs.map((v) => (0.7979 * (v - med)) / meanAd)
      method = 'mean-ad'
      note = 'More than half of the values are identical, so the MAD is 0; scores use the mean absolute deviation from the median instead.'
    } else {
      scores = xs.map(() => null)
      method = 'none'
      note = 'All values are identical, so there is no spread to score against and no value is an outlier.'
    }
  }
  const outliers = scores.flatMap((z, i) => (z !== null && Math.abs(z) > threshold ? [i] : []))
  return { scores, outliers, median: med * scale, mad: mad * scale, threshold, method, note }
}
