import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  DIXON_R10_CRITICAL,
  StatisticsError,
  dixonQTest,
  grubbsTest,
  modifiedZScores,
  summarize,
  tCritical,
} from '../../shared/utils/statistics'

// NIST/SEMATECH e-Handbook §1.3.5.17.1 Grubbs example data.
const NIST_GRUBBS = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]

describe('tCritical', () => {
  const table = ['12.7062', '4.3027', '3.1824', '2.7764', '2.5706', '2.4469', '2.3646', '2.3060', '2.2622', '2.2281']
  it.each(table.map((v, i) => [i + 1, v]))('t(0.975, df = %i) = %s (NIST e-Handbook t table)', (df, value) => {
    expect(tCritical(0.975, df as number).toFixed(4)).toBe(value)
  })

  it('refuses impossible arguments', () => {
    expect(() => tCritical(1, 3)).toThrow(StatisticsError)
    expect(() => tCritical(0.975, 0)).toThrow(/degrees of freedom/)
  })
})

describe('grubbsTest', () => {
  it('NIST e-Handbook example: G = 2.4687, critical 2.1266 (α = 0.05, two-sided), 245.57 is an outlier', () => {
    const r = grubbsTest(NIST_GRUBBS)
    expect(Math.abs(r.steps[0]!.G - 2.4687)).toBeLessThan(1e-3) // NIST/SEMATECH e-Handbook §1.3.5.17.1
    expect(r.steps[0]!.critical.toFixed(4)).toBe('2.1266') // NIST/SEMATECH e-Handbook §1.3.5.17.1
    expect(r.steps[0]).toMatchObject({ index: 7, value: 245.57, outlier: true, n: 8 })
    expect(r.outliers).toEqual([7])
  })

  it('NIST e-Handbook example, one-sided: critical 2.0317', () => {
    const r = grubbsTest(NIST_GRUBBS, { twoSided: false })
    expect(r.steps[0]!.critical.toFixed(4)).toBe('2.0317') // NIST/SEMATECH e-Handbook §1.3.5.17.1
    expect(r.outliers).toEqual([7])
  })

  it('iterates: after removing 245.57 the next most extreme value is kept (ASTM E178 repeated application)', () => {
    const r = grubbsTest(NIST_GRUBBS)
    expect(r.steps).toHaveLength(2)
    expect(r.steps[1]).toMatchObject({ n: 7, outlier: false })
    expect(grubbsTest(NIST_GRUBBS, { iterative: false }).steps).toHaveLength(1)
  })

  it('finds a second outlier on the next pass', () => {
    const r = grubbsTest([10.0, 10.1, 9.9, 10.05, 9.95, 10.02, 9.98, 10.03, 20.0, 11.0, 10.01, 9.97])
    expect(r.outliers).toEqual([8, 9])
    expect(r.steps.map((s) => s.n)).toEqual([12, 11, 10])
  })

  it('shows masking: two opposite outliers inflate s so neither is found (a known limit of Grubbs)', () => {
    expect(grubbsTest([10.0, 10.1, 9.9, 10.05, 9.95, 10.02, 9.98, 10.03, 14.0, 6.0, 10.01, 9.97]).outliers).toEqual([])
  })

  it('tests the low side when asked (one-sided)', () => {
    const data = [5, 20.1, 20.2, 19.9, 20.0, 20.05, 19.95, 30]
    expect(grubbsTest(data, { twoSided: false, side: 'low' }).steps[0]!.value).toBe(5)
    expect(grubbsTest(data, { twoSided: false, side: 'high' }).steps[0]!.value).toBe(30)
  })

  it('handles n < 3 and zero spread without crashing', () => {
    expect(grubbsTest([])).toMatchObject({ outliers: [], steps: [], note: expect.stringMatching(/at least 3/) })
    expect(grubbsTest([1, 2])).toMatchObject({ outliers: [], steps: [] })
    expect(grubbsTest([3, 3, 3, 3]).note).toMatch(/equal/)
    expect(() => grubbsTest([1, 2, Number.NaN])).toThrow(StatisticsError)
    expect(() => grubbsTest([1, 2, 3], { alpha: 2 })).toThrow(/α/)
  })
})

describe('dixonQTest', () => {
  it('uses the Rorabacher 1991 r10 Q95 table for n = 3..10 (Anal. Chem. 63 (1991) 139)', () => {
    expect(DIXON_R10_CRITICAL['0.95']).toEqual([0.970, 0.829, 0.710, 0.625, 0.568, 0.526, 0.493, 0.466])
    for (let n = 3; n <= 10; n++) {
      const values = Array.from({ length: n }, (_, i) => i)
      expect(dixonQTest(values).critical).toBe(DIXON_R10_CRITICAL['0.95']![n - 3])
    }
  })

  it('flags a far high value and keeps a moderate one (n = 4, Q95 = 0.829)', () => {
    expect(dixonQTest([10.1, 10.2, 10.15, 10.9])).toMatchObject({ q: expect.closeTo(0.875, 10), outlier: true, index: 3, side: 'high' })
    expect(dixonQTest([10.1, 10.2, 10.15, 10.5])).toMatchObject({ q: expect.closeTo(0.75, 10), outlier: false })
  })

  it('tests the low end when it is the more extreme one', () => {
    expect(dixonQTest([2.0, 5.0, 5.1, 5.2, 5.15])).toMatchObject({ side: 'low', index: 0, outlier: true })
  })

  it('offers 90 % (Rorabacher 1991, from memory) and refuses other levels', () => {
    expect(dixonQTest([1, 2, 3, 4, 5], { confidence: 0.9 }).critical).toBe(0.642)
    expect(() => dixonQTest([1, 2, 3], { confidence: 0.99 })).toThrow(StatisticsError)
  })

  it('gives a clear error outside n = 3..10', () => {
    expect(() => dixonQTest([1, 2])).toThrow(/3 to 10 values; there are 2/)
    expect(() => dixonQTest(Array.from({ length: 11 }, (_, i) => i))).toThrow(/there are 11/)
    expect(dixonQTest([4, 4, 4]).note).toMatch(/equal/)
  })
})

describe('modifiedZScores', () => {
  it('scores 0.6745 (x − median) / MAD and flags |M| > 3.5 (Iglewicz–Hoaglin)', () => {
    const r = modifiedZScores([1, 2, 3, 4, 100])
    expect(r.method).toBe('mad')
    expect(r.mad).toBe(1)
    expect(r.scores[4]).toBeCloseTo(0.6745 * 97, 10)
    expect(r.scores[0]).toBeCloseTo(-1.349, 10)
    expect(r.outliers).toEqual([4])
  })

  it('falls back to 0.7979 (x − median) / meanAD when MAD = 0, and says so (common practice)', () => {
    const r = modifiedZScores([5, 5, 5, 5, 9])
    expect(r.method).toBe('mean-ad')
    expect(r.scores[4]).toBeCloseTo((0.7979 * 4) / 0.8, 10)
    expect(r.outliers).toEqual([4])
    expect(r.note).toMatch(/MAD is 0/)
  })

  it('reports that nothing can be scored when all values are equal', () => {
    expect(modifiedZScores([2, 2, 2])).toMatchObject({ method: 'none', scores: [null, null, null], outliers: [] })
    expect(modifiedZScores([])).toMatchObject({ scores: [], outliers: [], note: 'No values.' })
  })

  it('respects the threshold option', () => {
    expect(modifiedZScores([1, 2, 3, 4, 8], { threshold: 2 }).outliers).toEqual([4])
    expect(modifiedZScores([1, 2, 3, 4, 8]).outliers).toEqual([])
  })
})

describe('summarize', () => {
  it('computes the usual statistics (t from the NIST table, quartiles by linear interpolation, common practice)', () => {
    const s = summarize([1, 2, 3, 4])
    expect(s).toMatchObject({ n: 4, mean: 2.5, median: 2.5, mad: 1, q1: 1.75, q3: 3.25, iqr: 1.5, min: 1, max: 4 })
    expect(s.sd).toBeCloseTo(1.290994, 6)
    expect(s.sem).toBeCloseTo(0.645497, 6)
    expect(s.ci![0]).toBeCloseTo(2.5 - 3.182446 * 0.645497, 5)
    expect(s.ci![1]).toBeCloseTo(2.5 + 3.182446 * 0.645497, 5)
    expect(s.cv).toBeCloseTo(0.516398, 6)
  })

  it('uses geometric mean and interval on a log scale', () => {
    const s = summarize([1, 10, 100], { logScale: true })
    const sdLn = Math.log(10)
    const sem = sdLn / Math.sqrt(3)
    expect(s.mean).toBeCloseTo(10, 10)
    expect(s.ci![0]).toBeCloseTo(Math.exp(Math.log(10) - tCritical(0.975, 2) * sem), 8)
    expect(s.ci![1]).toBeCloseTo(Math.exp(Math.log(10) + tCritical(0.975, 2) * sem), 8)
    expect(s.sd).toBeCloseTo(sdLn, 10)
    expect(s.scale).toBe('log')
    expect(summarize([1, -2], { logScale: true }).mean).toBeNull()
  })

  it('handles n = 0, 1 and 2 with null fields and reasons', () => {
    expect(summarize([])).toMatchObject({ n: 0, mean: null, sd: null, ci: null, notes: ['No values.'] })
    const one = summarize([3.7])
    expect(one).toMatchObject({ n: 1, mean: 3.7, median: 3.7, sd: null, ci: null })
    expect(one.notes[0]).toMatch(/at least 2/)
    const two = summarize([3, 5])
    expect(two.ci![0]).toBeCloseTo(4 - 12.7062 * 1, 3) // t(0.975, 1) = 12.7062, NIST e-Handbook t table
  })

  it('honours the confidence level and refuses a bad one', () => {
    const s90 = summarize([1, 2, 3, 4], { confidence: 0.9 })
    expect(s90.ci![1] - 2.5).toBeCloseTo(tCritical(0.95, 3) * 0.645497, 5)
    expect(() => summarize([1, 2], { confidence: 1.2 })).toThrow(StatisticsError)
  })

  it('keeps the mean inside its interval and the quartiles in order (property)', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 60 }), (xs) => {
      const s = summarize(xs)
      expect(s.ci![0]).toBeLessThanOrEqual(s.mean! + 1e-9)
      expect(s.ci![1]).toBeGreaterThanOrEqual(s.mean! - 1e-9)
      expect(s.min!).toBeLessThanOrEqual(s.q1!)
      expect(s.q1!).toBeLessThanOrEqual(s.median!)
      expect(s.median!).toBeLessThanOrEqual(s.q3!)
      expect(s.q3!).toBeLessThanOrEqual(s.max!)
    }))
  })
})
