import { describe, expect, it } from 'vitest'
import { findOutliers } from '../../shared/utils/outliers'

// NIST/SEMATECH e-Handbook §1.3.5.17.1 (Grubbs' test example): G = 2.4687, critical 2.1266
// (α = 0.05, two-sided); 245.57 is an outlier.
const NIST = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]
const byId = (xs: number[]) => xs.map((value, i) => ({ submissionId: 100 + i, value }))

describe('findOutliers', () => {
  it('Grubbs names the NIST outlier by its submission id with G and the critical value', () => {
    const report = findOutliers(byId(NIST), { test: 'grubbs', alpha: 0.05, zscoreLimit: 3.5 })
    expect(report.applied).toBe(true)
    expect(report.outliers).toHaveLength(1)
    expect(report.outliers[0]!.submissionId).toBe(107)
    expect(report.outliers[0]!.statistic).toBeCloseTo(2.4687, 3)
    expect(report.outliers[0]!.critical).toBeCloseTo(2.1266, 3)
  })

  it('Dixon r10 at 95 %: Q for n = 8 against 0.526 (Rorabacher, Anal. Chem. 63 (1991) 139)', () => {
    const report = findOutliers(byId(NIST), { test: 'dixon', alpha: 0.05, zscoreLimit: 3.5 })
    // Q = (245.57 − 202.18) / (245.57 − 199.31), computed by hand from the data.
    expect(report.outliers[0]!.statistic).toBeCloseTo((245.57 - 202.18) / (245.57 - 199.31), 10)
    expect(report.outliers[0]!.critical).toBe(0.526)
  })

  it('Dixon outside 3–10 results says why instead of failing', () => {
    const report = findOutliers(byId([...NIST, ...NIST]), { test: 'dixon', alpha: 0.05, zscoreLimit: 3.5 })
    expect(report.applied).toBe(false)
    expect(report.note).toMatch(/3 to 10/)
  })

  it('the modified z-score flags |M| above the limit (Iglewicz–Hoaglin, 3.5)', () => {
    const report = findOutliers(byId(NIST), { test: 'modified-z', alpha: 0.05, zscoreLimit: 3.5 })
    expect(report.outliers.map((o) => o.submissionId)).toEqual([107])
  })

  it('the generalized ESD test names both masked outliers with their step, R and λ (Rosner 1983)', () => {
    // Two equal far-off runs: repeated Grubbs' tests find neither (masking), GESD finds both.
    const masked = byId([10.0, 10.1, 9.9, 10.2, 9.8, 10.0, 15.0, 15.0])
    expect(findOutliers(masked, { test: 'grubbs', alpha: 0.05, zscoreLimit: 3.5 }).outliers).toEqual([])
    const report = findOutliers(masked, { test: 'gesd', alpha: 0.05, zscoreLimit: 3.5 })
    expect(report).toMatchObject({ test: 'gesd', applied: true, maxOutliers: 2 })
    expect(report.outliers.map((o) => o.submissionId).sort()).toEqual([106, 107])
    expect(report.outliers.map((o) => o.step)).toEqual([1, 2])
    // Step 1's own R is below its λ; step 2 decides, so both removed values are outliers.
    expect(report.outliers[0]!.statistic).toBeLessThan(report.outliers[0]!.critical)
    expect(report.outliers[1]!.statistic).toBeGreaterThan(report.outliers[1]!.critical)
    expect(findOutliers(masked, { test: 'gesd', alpha: 0.05, zscoreLimit: 3.5, maxOutliers: 1 }).outliers).toEqual([])
  })

  it('the generalized ESD test on the NIST Grubbs data: the same single outlier, G = R_1 = 2.4687', () => {
    const report = findOutliers(byId(NIST), { test: 'gesd', alpha: 0.05, zscoreLimit: 3.5 })
    expect(report.outliers.map((o) => o.submissionId)).toEqual([107])
    expect(report.outliers[0]!.statistic).toBeCloseTo(2.4687, 3) // NIST/SEMATECH e-Handbook §1.3.5.17.1
  })

  it('too few results for the generalized ESD test is "not applied", never "no outliers"', () => {
    expect(findOutliers(byId([3.1, 3.4]), { test: 'gesd', alpha: 0.05, zscoreLimit: 3.5 })).toMatchObject({ applied: false, outliers: [], note: expect.stringMatching(/at least 3/) })
  })

  it('Grubbs on 6 or fewer results still runs but says it is unreliable (NIST/SEMATECH e-Handbook §1.3.5.17.1)', () => {
    const six = findOutliers(byId([3.1, 3.3, 3.2, 3.4, 3.0, 5.9]), { test: 'grubbs', alpha: 0.05, zscoreLimit: 3.5 })
    expect(six.applied).toBe(true)
    expect(six.note).toMatch(/6 or fewer/)
    expect(findOutliers(byId(NIST), { test: 'grubbs', alpha: 0.05, zscoreLimit: 3.5 }).note).toBeNull()
  })

  it('Dixon below 3 results is "not applied" with the reason', () => {
    expect(findOutliers(byId([3.1, 3.4]), { test: 'dixon', alpha: 0.05, zscoreLimit: 3.5 })).toMatchObject({ applied: false, outliers: [], note: expect.stringMatching(/3 to 10/) })
  })

  it('too few results for Grubbs is reported, not a crash', () => {
    expect(findOutliers(byId([3.1, 3.4]), { test: 'grubbs', alpha: 0.05, zscoreLimit: 3.5 })).toMatchObject({ applied: false, outliers: [] })
  })
})
