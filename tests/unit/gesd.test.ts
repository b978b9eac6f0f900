import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { gesdCritical, gesdDefaultMaxOutliers, gesdTest } from '../../shared/utils/gesd'
import { grubbsTest, StatisticsError } from '../../shared/utils/statistics'

// NIST/SEMATECH e-Handbook §1.3.5.17.3 (Generalized ESD test), worked example: Rosner's 54
// observations (Rosner, Technometrics 25 (1983) 165), tested with r = 10 at α = 0.05.
const ROSNER_54 = [
  -0.25, 0.68, 0.94, 1.15, 1.20, 1.26, 1.26, 1.34, 1.38, 1.43, 1.49, 1.49, 1.55, 1.56,
  1.58, 1.65, 1.69, 1.70, 1.76, 1.77, 1.81, 1.91, 1.94, 1.96, 1.99, 2.06, 2.09, 2.10,
  2.14, 2.15, 2.23, 2.24, 2.26, 2.35, 2.37, 2.40, 2.47, 2.54, 2.62, 2.64, 2.90, 2.92,
  2.92, 2.93, 3.21, 3.26, 3.30, 3.59, 3.68, 4.30, 4.64, 5.34, 5.42, 6.01,
]
// The handbook's table (R_i, λ_i) for i = 1…10, as printed by its companion R program
// (six decimals; the handbook's Dataplot table shows the same figures to three).
const ROSNER_TABLE: Array<[number, number]> = [
  [3.118906, 3.158794], [2.942973, 3.151430], [3.179424, 3.143890], [2.810181, 3.136165], [2.815580, 3.128247],
  [2.848172, 3.120128], [2.279327, 3.111796], [2.310366, 3.103243], [2.101581, 3.094456], [2.067178, 3.085425],
]

// NIST/SEMATECH e-Handbook §1.3.5.17.1 (Grubbs' test example): G = 2.4687, critical 2.1266.
const NIST_GRUBBS = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]

// Two equal far-off values inflate s so neither stands out to Grubbs' test: masking (invented
// for this check; the e-Handbook §1.3.5.17 describes the effect).
const MASKED = [10.0, 10.1, 9.9, 10.2, 9.8, 10.0, 15.0, 15.0]

describe('gesdTest', () => {
  it('reproduces the e-Handbook §1.3.5.17.3 table for Rosner’s 54 values, r = 10: three outliers', () => {
    const result = gesdTest(ROSNER_54, { maxOutliers: 10 })
    expect(result.steps).toHaveLength(10)
    result.steps.forEach((step, i) => {
      expect(step.step).toBe(i + 1)
      expect(Math.abs(step.R - ROSNER_TABLE[i]![0])).toBeLessThan(5e-6) // e-Handbook §1.3.5.17.3
      expect(Math.abs(step.lambda - ROSNER_TABLE[i]![1])).toBeLessThan(5e-6) // e-Handbook §1.3.5.17.3
    })
    // R_1 < λ_1 and R_2 < λ_2, yet R_3 > λ_3: the three most extreme values are all outliers.
    expect(result.count).toBe(3)
    expect(result.outliers.map((i) => ROSNER_54[i])).toEqual([6.01, 5.42, 5.34])
    expect(result.note).toMatch(/Step 3 is the last/)
  })

  it('finds both of two equal outliers that repeated Grubbs’ tests miss (masking)', () => {
    expect(grubbsTest(MASKED).outliers).toEqual([])
    const result = gesdTest(MASKED)
    expect(result.maxOutliers).toBe(2)
    expect(result.count).toBe(2)
    expect(result.outliers.sort()).toEqual([6, 7])
    expect(result.steps[0]!.R).toBeLessThan(result.steps[0]!.lambda)
    expect(result.steps[1]!.R).toBeGreaterThan(result.steps[1]!.lambda)
  })

  it('with r = 1 is Grubbs’ two-sided test: the e-Handbook §1.3.5.17.1 example, G = 2.4687 against 2.1266', () => {
    const result = gesdTest(NIST_GRUBBS, { maxOutliers: 1 })
    expect(Math.abs(result.steps[0]!.R - 2.4687)).toBeLessThan(1e-3) // e-Handbook §1.3.5.17.1
    expect(result.steps[0]!.lambda.toFixed(4)).toBe('2.1266') // e-Handbook §1.3.5.17.1
    expect(result.outliers).toEqual([7])
  })

  it('runs at n = 3 with one degree of freedom; λ_1 equals Grubbs’ critical value there', () => {
    const result = gesdTest([1, 1, 100])
    expect(result.maxOutliers).toBe(1)
    expect(result.steps).toHaveLength(1)
    // (n − 1)/√n = 1.1547 is the largest G possible at n = 3 (ASTM E178), reached by [a, a, b].
    expect(result.steps[0]!.R).toBeCloseTo(2 / Math.sqrt(3), 12)
    expect(result.steps[0]!.lambda).toBeCloseTo(grubbsTest([1, 1, 100]).steps[0]!.critical, 12)
    expect(result.steps[0]!.lambda).toBeLessThan(2 / Math.sqrt(3))
    expect(result.outliers).toEqual([2])
    expect(result.note).toMatch(/approximate/)
  })

  it('flags nothing among equal values, and stops when the rest become equal', () => {
    expect(gesdTest([3.2, 3.2, 3.2, 3.2, 3.2])).toMatchObject({ outliers: [], steps: [], count: 0 })
    expect(gesdTest([3.2, 3.2, 3.2, 3.2, 3.2]).note).toMatch(/All values are equal/)
    const stops = gesdTest([4, 4, 4, 4, 4, 4, 4, 9, 12, 4], { maxOutliers: 4 })
    expect(stops.steps).toHaveLength(2)
    expect(stops.note).toMatch(/After 2 removal/)
  })

  it('keeps r within 1 … n − 2 and says when it lowered it', () => {
    expect([3, 4, 8, 10, 14, 32, 54].map(gesdDefaultMaxOutliers)).toEqual([1, 2, 2, 2, 2, 6, 10])
    const lowered = gesdTest(MASKED, { maxOutliers: 20 })
    expect(lowered.maxOutliers).toBe(6)
    expect(lowered.steps).toHaveLength(6)
    expect(lowered.note).toMatch(/lowered from 20 to 6/)
    expect(() => gesdTest(MASKED, { maxOutliers: 0 })).toThrow(StatisticsError)
    expect(() => gesdTest(MASKED, { maxOutliers: 1.5 })).toThrow(/whole number/)
    expect(() => gesdTest([1, 2])).toThrow(/at least 3/)
    expect(() => gesdCritical(5, 4, 0.05)).toThrow(/degrees of freedom/)
    expect(() => gesdTest([1, 2, Number.NaN])).toThrow(/not a finite number/)
  })

  it('gives the same answer for values near the largest double (a scaled sum, no overflow)', () => {
    const huge = MASKED.map((v) => v * 1e306)
    const result = gesdTest(huge)
    expect(result.outliers.sort()).toEqual([6, 7])
    result.steps.forEach((st, i) => expect(st.R).toBeCloseTo(gesdTest(MASKED).steps[i]!.R, 9))
    expect(result.steps.every((st) => Number.isFinite(st.R) && Number.isFinite(st.lambda))).toBe(true)
  })
})

// The definition itself (NIST e-Handbook §1.3.5.17.3): at each step take the value furthest from
// the mean of those left, R = |x − mean| / s, then remove it. The engine's sorted fast path must
// choose the same values, in the same order, with the same R.
function plainSteps(xs: number[], r: number): Array<{ index: number, R: number }> {
  let left = xs.map((value, index) => ({ value, index }))
  const steps: Array<{ index: number, R: number }> = []
  for (let i = 0; i < r; i++) {
    // Measured from one of the values (R does not change with a shift): values a rounding
    // apart, such as 1000 and 1000.0000000000001, then differ exactly instead of vanishing
    // into the rounding of a sum near 3000.
    const origin = left[0]!.value
    const at = (v: { value: number }) => v.value - origin
    const mean = left.reduce((s, v) => s + at(v), 0) / left.length
    const sd = Math.sqrt(left.reduce((s, v) => s + (at(v) - mean) ** 2, 0) / (left.length - 1))
    if (!(sd > 0)) break
    const far = left.reduce((best, v) => (Math.abs(at(v) - mean) > Math.abs(at(best) - mean) ? v : best))
    steps.push({ index: far.index, R: Math.abs(at(far) - mean) / sd })
    left = left.filter((v) => v !== far)
  }
  return steps
}

describe('gesdTest against the plain definition', () => {
  it('removes the same values in the same order with the same R, ties and far-off values included', () => {
    fc.assert(fc.property(
      fc.array(fc.oneof(
        fc.integer({ min: -6, max: 6 }),
        // Ordinary magnitudes: the plain scan has no scaling, so subnormal squares would underflow in it.
        fc.double({ min: -10, max: 10, noNaN: true }).map((v) => Math.round(v * 1e6) / 1e6),
        fc.double({ min: 1e3, max: 1e7, noNaN: true }),
      ), { minLength: 3, maxLength: 60 }),
      (xs) => {
        const fast = gesdTest(xs)
        const plain = plainSteps(xs, fast.maxOutliers)
        expect(fast.steps).toHaveLength(plain.length)
        fast.steps.forEach((s, i) => {
          // Two values a rounding apart are one tie: either may go first.
          const chosen = xs[plain[i]!.index]!
          if (Math.abs(s.value - chosen) > 1e-12 * Math.abs(chosen)) expect(s.index).toBe(plain[i]!.index)
          expect(Math.abs(s.R - plain[i]!.R)).toBeLessThanOrEqual(1e-9 * plain[i]!.R)
        })
      },
    ), { numRuns: 2000 })
    // Found by a random run: two equal values and one a rounding above them.
    const nearTies = gesdTest([1000, 1000, 1000.0000000000001])
    expect(nearTies.steps[0]!.R).toBeCloseTo(plainSteps([1000, 1000, 1000.0000000000001], 1)[0]!.R, 12)
  })

  it('handles a class of 20,000 results with 4,000 steps (the sorted path, not a scan per step)', () => {
    const xs = Array.from({ length: 20000 }, (_, i) => 3 + Math.sin(i) + (i % 997 === 0 ? 50 : 0))
    const result = gesdTest(xs)
    expect(result.maxOutliers).toBe(4000)
    // The 21 runs at +50 stand far out; the sine values around 3 do not.
    expect(result.outliers.map((i) => i % 997)).toEqual(Array(21).fill(0))
  })
})
