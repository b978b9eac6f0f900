// The generalized extreme Studentized deviate (ESD) test: Rosner, Technometrics 25 (1983) 165;
// NIST/SEMATECH e-Handbook §1.3.5.17.3. Given an upper bound r, it removes the most extreme value
// r times and then decides how many of them are outliers all at once, so two far-off results
// cannot hide each other as they do from repeated Grubbs' tests (masking). Pure.
import { StatisticsError, tCritical } from './statistics'
import { medianOf, requireFiniteList, tameScale } from './lib/moments'

export interface GesdStep {
  /** i = 1…r */
  step: number
  /** Values left before this step's removal (n − i + 1). */
  size: number
  /** Index in the input of the value removed at this step. */
  index: number
  value: number
  /** R_i = max |x − mean| / s over the values left. */
  R: number
  /** λ_i, the critical value for i outliers. */
  lambda: number
}

export interface GesdResult {
  /** Indices of the outliers in the input, most extreme first. */
  outliers: number[]
  steps: GesdStep[]
  /** The largest i with R_i > λ_i (0: none). */
  count: number
  /** The bound used, after any lowering to n − 2. */
  maxOutliers: number
  alpha: number
  note: string | null
}

/**
 * Default upper bound r: one result in five, as in the e-Handbook's own example (r = 10 for
 * 54 values), but at least 2 so that a pair of bad runs masking each other can be found, and at
 * most n − 2 so the last step keeps n − r − 1 ≥ 1 degree of freedom. A class rarely has more
 * than one bad run in five; a larger r would let the final steps judge a handful of survivors.
 */
export function gesdDefaultMaxOutliers(n: number): number {
  return Math.max(0, Math.min(n - 2, Math.max(2, Math.floor(n / 5))))
}

/** λ_i = (n − i)·t / √((n − i − 1 + t²)(n − i + 1)), t at p = 1 − α/(2(n − i + 1)) with n − i − 1 df. */
export function gesdCritical(n: number, i: number, alpha: number): number {
  const df = n - i - 1
  if (df < 1) throw new StatisticsError(`Step ${i} of the generalized ESD test needs n - i - 1 >= 1 degrees of freedom; n is ${n}.`)
  // λ_i depends on n and i only through the values left, n − i + 1; a class of 20,000 needs
  // 4,000 of them (a t quantile each, about a fifth of a second), and one more upload shifts
  // them by one. Kept per α and size, so a class that grows reuses all but one.
  const key = `${alpha}:${n - i + 1}`
  const known = criticalValues.get(key)
  if (known !== undefined) return known
  const t = tCritical(1 - alpha / (2 * (n - i + 1)), df)
  const lambda = ((n - i) * t) / Math.sqrt((df + t * t) * (n - i + 1))
  if (criticalValues.size >= CRITICAL_VALUES_LIMIT) criticalValues.clear()
  criticalValues.set(key, lambda)
  return lambda
}

const CRITICAL_VALUES_LIMIT = 200_000
const criticalValues = new Map<string, number>()

/** Below this many values Rosner's λ is only roughly right (e-Handbook §1.3.5.17.3, from memory). */
const GESD_ACCURATE_N = 15

export function gesdTest(values: readonly number[], options: { alpha?: number, maxOutliers?: number | null } = {}): GesdResult {
  const xs = requireFiniteList(values, (message) => new StatisticsError(message))
  const alpha = options.alpha ?? 0.05
  if (!(alpha > 0 && alpha < 1)) throw new StatisticsError('Alpha must lie strictly between 0 and 1.')
  const n = xs.length
  if (n < 3) throw new StatisticsError(`The generalized ESD test needs at least 3 results; there are ${n}.`)
  const asked = options.maxOutliers ?? null
  if (asked !== null && !(Number.isInteger(asked) && asked >= 1)) {
    throw new StatisticsError('The most outliers to look for (r) must be a whole number of at least 1.')
  }
  const r = asked === null ? gesdDefaultMaxOutliers(n) : Math.min(asked, n - 2)
  const notes: string[] = []
  if (asked !== null && asked > n - 2) {
    notes.push(
      `At most ${n - 2} outliers can be tested among ${n} results (each step needs a degree of freedom), so r was lowered from ${asked} to ${r}.`,
    )
  }
  if (n < GESD_ACCURATE_N) notes.push(`With fewer than ${GESD_ACCURATE_N} results the critical values are approximate.`)

  const steps = extremeSteps(xs, r, alpha, n, notes)
  const count = steps.reduce((k, st) => (st.R > st.lambda ? st.step : k), 0)
  if (count > 0) {
    const which = count === 1 ? 'the most extreme result is an outlier' : `the ${count} most extreme results are outliers`
    notes.push(`Step ${count} is the last whose R exceeds its critical value, so ${which} (up to ${r} tested).`)
  }
  return {
    outliers: steps.slice(0, count).map((st) => st.index),
    steps,
    count,
    maxOutliers: r,
    alpha,
    note: notes.length ? notes.join(' ') : null,
  }
}

/**
 * The r removal steps in O(n log n + r): the value furthest from the mean is always the lowest or
 * the highest left, so the values are sorted once and the remaining ones stay a contiguous run
 * whose sums are kept as values leave it. Sums are taken about the median (tamed values, so
 * nothing overflows) and summed afresh whenever what is left has fallen far below what was
 * summed, or the mean has moved far from the shift, so no cancellation creeps in. Among equal
 * deviations the value earliest in the input goes first, as a plain scan of the remaining
 * values would choose.
 */
function extremeSteps(xs: number[], r: number, alpha: number, n: number, notes: string[]): GesdStep[] {
  const tamed = tameScale(xs).values
  const centre = medianOf(tamed)
  const w = tamed.map((v) => v - centre)
  const ord = w.map((_, i) => i).sort((a, b) => w[a]! - w[b]! || a - b)
  const at = (p: number) => w[ord[p]!]!
  let lo = 0
  let hi = n - 1
  let s1 = 0
  let s2 = 0
  // Sums are of (w − shift); the shift moves to the mean when the values left sit far from it.
  let shift = 0
  // The sum of squares when last summed afresh: its rounding stays in s2 as values leave.
  let peak = 0
  const resum = (recentre = false) => {
    if (recentre) {
      let total = 0
      for (let p = lo; p <= hi; p++) total += at(p)
      shift = total / (hi - lo + 1)
    }
    s1 = 0
    s2 = 0
    for (let p = lo; p <= hi; p++) { const d = at(p) - shift; s1 += d; s2 += d * d }
    peak = s2
  }
  resum()
  // Equal values at the top leave lowest input index first: they are taken from the group's start.
  let groupStart = hi
  let groupTaken = 0
  const findGroup = () => {
    groupStart = hi
    while (groupStart > lo && at(groupStart - 1) === at(hi)) groupStart--
    groupTaken = 0
  }
  findGroup()
  const steps: GesdStep[] = []
  for (let i = 1; i <= r; i++) {
    if (at(lo) === at(hi)) {
      notes.push(i === 1
        ? 'All values are equal, so none can be an outlier.'
        : `After ${i - 1} ${i === 2 ? 'removal' : 'removals'} the remaining values are all equal, so the test stops there.`)
      break
    }
    const k = hi - lo + 1
    let variance = (s2 - (s1 * s1) / k) / (k - 1)
    // A mean far from the shift (in SDs) leaves the difference above to rounding: sum afresh.
    if (!(variance > 0) || s1 * s1 > 1e3 * k * k * variance) { resum(true); variance = (s2 - (s1 * s1) / k) / (k - 1) }
    const sd = Math.sqrt(Math.max(variance, 0))
    const m = s1 / k + shift
    const low = ord[lo]!
    const high = ord[groupStart + groupTaken]!
    const dLow = m - w[low]!
    const dHigh = w[high]! - m
    const takeHigh = dHigh > dLow || (dHigh === dLow && high < low)
    const index = takeHigh ? high : low
    const removed = w[index]!
    steps.push({ step: i, size: k, index, value: xs[index]!, R: (takeHigh ? dHigh : dLow) / sd, lambda: gesdCritical(n, i, alpha) })
    if (takeHigh) {
      groupTaken++
      hi--
      if (hi < groupStart) findGroup()
    } else lo++
    const d = removed - shift
    s1 -= d
    s2 -= d * d
    if (peak > 1e3 * s2) resum()
  }
  return steps
}
