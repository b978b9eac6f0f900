// Means, spreads and quantiles that neither overflow nor turn into NaN. Pure helpers for the
// statistics engines (not auto-imported: import them explicitly).
//
// A sum of squares of values near 1e160, or a difference of values near ±1e308, passes
// Number.MAX_VALUE and becomes Infinity. Values that large (or that small) are first divided by
// the largest magnitude, a scaled sum (common practice); the ratios the tests use (G, R, Q, M)
// do not change, and location and spread are multiplied back afterwards.

/** Magnitudes between these are summed as they are: squares and differences stay finite. */
const SAFE_HIGH = 1e150
const SAFE_LOW = 1e-150

export function requireFiniteList(values: readonly number[], fail: (message: string) => Error): number[] {
  if (!Array.isArray(values)) throw fail('Values must be a list of numbers.')
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw fail(`Value ${i + 1} is not a finite number.`)
  })
  return [...values]
}

export interface ScaledValues {
  values: number[]
  /** Multiply a location or spread computed on `values` by this to return to the data's units. */
  scale: number
}

/** The values themselves when they are of ordinary size, else divided by the largest magnitude. */
export function tameScale(xs: readonly number[]): ScaledValues {
  const largest = xs.reduce((m, v) => Math.max(m, Math.abs(v)), 0)
  if (largest === 0 || (largest < SAFE_HIGH && largest > SAFE_LOW)) return { values: [...xs], scale: 1 }
  return { values: xs.map((v) => v / largest), scale: largest }
}

export const meanOf = (xs: readonly number[]) => xs.reduce((s, v) => s + v, 0) / xs.length

export function sampleSdOf(xs: readonly number[]): number {
  const m = meanOf(xs)
  return Math.sqrt(xs.reduce((s, v) => s + (v - m) ** 2, 0) / (xs.length - 1))
}

/** Mean and sample SD, through a scaled sum when the plain one would overflow. */
export function momentsOf(xs: readonly number[]): { mean: number, sd: number } {
  const { values, scale } = tameScale(xs)
  return { mean: meanOf(values) * scale, sd: sampleSdOf(values) * scale }
}

/**
 * Linear-interpolation quantile (Hyndman–Fan type 7, the spreadsheet default; common practice).
 * a + w(b − a) is exact when a = b, even among subnormal values; only when the gap itself
 * overflows (huge values of opposite sign) does it fall back to the weighted sum.
 */
export function quantileOf(sorted: ArrayLike<number>, p: number): number {
  const h = (sorted.length - 1) * p
  const lo = Math.floor(h)
  const w = h - lo
  const a = sorted[lo]!
  const b = sorted[Math.min(lo + 1, sorted.length - 1)]!
  const gap = b - a
  return w === 0 ? a : Number.isFinite(gap) ? a + w * gap : a * (1 - w) + b * w
}

/**
 * The values in ascending order, as a typed array: its sort is numeric and native, several times
 * faster than Array#sort with a comparator at 20,000 values (the order is the same; only a -0
 * beside a 0 may swap places, which no figure can tell apart).
 */
export const ascending = (xs: readonly number[]): Float64Array => Float64Array.from(xs).sort()

export const medianOf = (xs: readonly number[]) => quantileOf(ascending(xs), 0.5)

/** Raw median absolute deviation (not scaled by 1.4826), through scaled values when needed. */
export function madOf(xs: readonly number[], med: number): number {
  const { values, scale } = tameScale([...xs, med])
  const m = values.pop()!
  return medianOf(values.map((v) => Math.abs(v - m))) * scale
}
