import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { chooseHeadline, formatArithmeticMean, formatHeadline, medianInterval } from '../../shared/utils/headline'
import { summarize } from '../../shared/utils/statistics'

// t(0.975, 2) = 4.3027 (NIST e-Handbook t table).
const T_0975_2 = 4.3027

describe('chooseHeadline', () => {
  it('leads with the geometric mean and its back-transformed t interval when every value is above zero', () => {
    const h = chooseHeadline([1, 10, 100])
    // ln values 0, ln 10, 2 ln 10: mean ln 10, s = ln 10, so the geometric mean is exactly 10.
    const half = T_0975_2 * Math.log(10) / Math.sqrt(3)
    expect(h.statistic).toBe('geometric-mean')
    expect(h.value).toBeCloseTo(10, 10)
    expect(h.ci95![0]).toBeCloseTo(10 * Math.exp(-half), 3)
    expect(h.ci95![1] / (10 * Math.exp(half))).toBeCloseTo(1, 3)
    expect(h.interval).toMatchObject({ method: 'log-t', confidence: 0.95 })
    expect(h.median).toBe(10)
    expect(h.mean).toBe(37)
    expect(formatHeadline(h)).toMatch(/^Geometric mean 10\.00 \(95 % CI 0\.\d\d to \d+\.\d\d\)$/)
  })

  it('one run ten times the rest: the arithmetic interval reaches below zero, the headline does not', () => {
    // Invented class: 31 runs near 3.4 and one botched run at 116.65 (as the demo's bad run).
    const values = [...Array.from({ length: 31 }, (_, i) => 3.1 + (i % 7) * 0.1), 116.65]
    expect(summarize(values).ci![0]).toBeLessThan(3)
    const h = chooseHeadline(values, { unreviewedOutliers: 1 })
    expect(h.statistic).toBe('geometric-mean')
    expect(h.ci95![0]).toBeGreaterThan(0)
    expect(h.value!).toBeLessThan(h.mean!)
    expect(h.meanPulledByOutliers).toBe(true)
    expect(formatArithmeticMean(h)).toMatch(/pulled up by 1 flagged run no reviewer has decided on yet/)
    expect(formatArithmeticMean(chooseHeadline(values))).not.toMatch(/pulled/)
  })

  it('falls back to the median with a rank interval when a value is zero or below', () => {
    const h = chooseHeadline([0, 2.9, 3.1, 3.3, 3.4, 3.6, 3.8])
    expect(h.statistic).toBe('median')
    expect(h.value).toBe(3.3)
    // n = 7: P(B ≤ 0) = 1/128, so x(1) to x(7) covers 1 − 2/128 = 98.4 % (exact binomial, by hand);
    // x(2) to x(6) would cover only 1 − 2·8/128 = 87.5 %.
    expect(h.ci95).toEqual([0, 3.8])
    expect(h.interval).toMatchObject({ method: 'order-statistics', ranks: [1, 7] })
    expect(h.interval!.coverage).toBeCloseTo(1 - 2 / 128, 12)
    expect(h.reason).toMatch(/1 result is zero or below/)
    expect(formatHeadline(h)).toBe('Median 3.30 (95 % CI 0.00 to 3.80)')
  })

  it('says when there is nothing, one value, or too few for a rank interval', () => {
    expect(chooseHeadline([])).toMatchObject({ statistic: null, value: null, ci95: null })
    expect(formatHeadline(chooseHeadline([]))).toBe('no results yet')
    expect(chooseHeadline([3.4])).toMatchObject({ statistic: 'geometric-mean', value: 3.4, ci95: null })
    const few = chooseHeadline([-1, 2, 3])
    expect(few).toMatchObject({ statistic: 'median', value: 2, ci95: null })
    expect(few.notes.join(' ')).toMatch(/at least 6 results/)
  })

  it('never gives an interval below zero for positive data, nor outside the data otherwise (property)', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -50, max: 1e4, noNaN: true }), { minLength: 1, maxLength: 80 }), (xs) => {
      const h = chooseHeadline(xs)
      const [lo, hi] = [Math.min(...xs), Math.max(...xs)]
      expect(Number.isFinite(h.value!)).toBe(true)
      if (h.ci95) {
        expect(h.ci95[0]).toBeLessThanOrEqual(h.value! * (1 + 1e-12) + 1e-12)
        expect(h.ci95[1]).toBeGreaterThanOrEqual(h.value! * (1 - 1e-12) - 1e-12)
        if (lo > 0) expect(h.ci95[0]).toBeGreaterThanOrEqual(0)
        if (h.statistic === 'median') expect(h.ci95[0] >= lo && h.ci95[1] <= hi).toBe(true)
      }
      // Positive data lead with the geometric mean unless its interval overflows (values 1e-300 and 1e-2).
      if (lo <= 0) expect(h.statistic).toBe('median')
      else if (h.statistic === 'median') expect(h.notes.join(' ')).toMatch(/orders of magnitude/)
    }))
  })

  it('stays finite for values near the largest double: the median leads when the log interval overflows', () => {
    const h = chooseHeadline([1e-300, 1e300, 1e300, 2e300, 3e300, 4e300, 5e300])
    expect(h.statistic).toBe('median')
    expect(h.value).toBe(2e300)
    expect(h.notes.join(' ')).toMatch(/orders of magnitude/)
    const big = chooseHeadline([1e300, 2e300, 3e300])
    expect(big.statistic).toBe('geometric-mean')
    expect(big.value! / 1e300).toBeCloseTo(Math.cbrt(6), 9)
    expect(Number.isFinite(big.mean!)).toBe(true)
    expect(big.mean).toBeCloseTo(2e300, -290)
  })
})

describe('medianInterval', () => {
  // Ranks and coverage from the exact Binomial(n, 1/2) distribution, worked by hand:
  // n = 6: P(B ≤ 0) = 1/64; n = 10: P(B ≤ 1) = 11/1024, P(B ≤ 2) = 56/1024;
  // n = 20: P(B ≤ 5) = 21700/2^20 = 0.0207, P(B ≤ 6) = 60460/2^20 = 0.0577.
  it.each([
    [5, null, null],
    [6, [1, 6], 1 - 2 / 64],
    [10, [2, 9], 1 - 22 / 1024],
    [20, [6, 15], 1 - 2 * 21700 / 2 ** 20],
  ])('n = %i: ranks %j', (n, ranks, coverage) => {
    const xs = Array.from({ length: n as number }, (_, i) => i + 1)
    const result = medianInterval(xs)
    if (ranks === null) return expect(result).toBeNull()
    expect(result!.ranks).toEqual(ranks)
    expect(result!.ci).toEqual(ranks)
    expect(result!.coverage).toBeCloseTo(coverage as number, 8)
  })

  it('handles a thousand values without overflow (incomplete beta, not factorials)', () => {
    const result = medianInterval(Array.from({ length: 1000 }, (_, i) => i))!
    // Normal approximation: k ≈ n/2 − 1.96·√n/2 = 469 (common practice); the exact rank is close.
    expect(Math.abs(result.ranks[0] - 469)).toBeLessThanOrEqual(2)
    expect(result.coverage).toBeGreaterThanOrEqual(0.95)
  })
})

describe('summarize against overflow', () => {
  it('summarises 1e300s without Infinity or NaN', () => {
    const s = summarize([1e300, 2e300, 3e300, 4e300])
    const values = [s.mean, s.sd, s.sem, s.median, s.mad, s.q1, s.q3, s.iqr, s.min, s.max, s.cv, ...s.ci!]
    for (const v of values) expect(Number.isFinite(v)).toBe(true)
    expect(s.mean! / 1e300).toBeCloseTo(2.5, 12)
    expect(s.sd! / 1e300).toBeCloseTo(Math.sqrt(5 / 3), 12)
  })

  it('leaves a figure blank, with a note, when its true value is past the largest double', () => {
    const s = summarize([-1.7e308, -1.7e308, 1.7e308, 1.7e308])
    expect(s.mean).toBe(0)
    expect(s.median).toBe(0)
    expect(s.min).toBe(-1.7e308)
    // The SD (1.96e308) and the IQR (3.4e308) are past Number.MAX_VALUE = 1.797e308.
    expect(s.sd).toBeNull()
    expect(s.iqr).toBeNull()
    expect(s.notes.join(' ')).toMatch(/largest number/)
    expect(numbersIn(s).every(Number.isFinite)).toBe(true)
  })

  it('gives no Infinity or NaN for any finite doubles, from 5e-324 to 1.8e308 of either sign (property)', () => {
    fc.assert(fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 40 }), (xs) => {
      expect(numbersIn(summarize(xs)).every(Number.isFinite)).toBe(true)
      expect(numbersIn(chooseHeadline(xs)).every(Number.isFinite)).toBe(true)
    }), { numRuns: 500 })
  })
})

/** Every number anywhere in a result (JSON.stringify would hide NaN and Infinity as null). */
function numbersIn(value: unknown): number[] {
  if (typeof value === 'number') return [value]
  return value && typeof value === 'object' ? Object.values(value).flatMap(numbersIn) : []
}
