import { describe, expect, it } from 'vitest'
import { accuracyShare, rubricMaximum, rubricScoreIssues, rubricTotal, startingScores, suggestAccuracyPoints, type GradingCriterion } from '../../shared/utils/grading'

// The rule under test is the product's own (issue 5): full points within the course's
// tolerance of the literature value, a straight line down to 0 at three times the tolerance.
// The numbers below are worked by hand from that rule; no published check value applies.

const RUBRIC: GradingCriterion[] = [
  { key: 'accuracy', label: 'Selectivity against the literature value', maxPoints: 10, kind: 'accuracy' },
  { key: 'chromatogram', label: 'Chromatogram and peak assignment', maxPoints: 6, kind: 'manual' },
  { key: 'analysis', label: 'Calculation and discussion', maxPoints: 4, kind: 'manual' },
]
const ten = { maxPoints: 10 }

describe('suggested accuracy score', () => {
  it('gives full points within the tolerance, including exactly at it', () => {
    expect(suggestAccuracyPoints(ten, { observed: 3.0, expected: 3.0, tolerancePercent: 15 })).toBe(10)
    expect(suggestAccuracyPoints(ten, { observed: 3.3, expected: 3.0, tolerancePercent: 15 })).toBe(10)
    // 0.45 / 3 is 0.15000000000000002 in floating point: still "within 15 %".
    expect(suggestAccuracyPoints(ten, { observed: 3.45, expected: 3.0, tolerancePercent: 15 })).toBe(10)
    expect(suggestAccuracyPoints(ten, { observed: 2.55, expected: 3.0, tolerancePercent: 15 })).toBe(10)
  })

  it('falls linearly between the tolerance and three times it, on either side', () => {
    // 30 % off with a 15 % tolerance: halfway down the slope.
    expect(suggestAccuracyPoints(ten, { observed: 3.9, expected: 3.0, tolerancePercent: 15 })).toBe(5)
    expect(suggestAccuracyPoints(ten, { observed: 2.1, expected: 3.0, tolerancePercent: 15 })).toBe(5)
    // 20 % off: (45 − 20) / 30 of the points = 8.33… → 8.3.
    expect(suggestAccuracyPoints(ten, { observed: 3.6, expected: 3.0, tolerancePercent: 15 })).toBe(8.3)
    const share = accuracyShare({ observed: 3.6, expected: 3.0, tolerancePercent: 15 })
    expect(share.deviationPercent).toBeCloseTo(20, 9)
    expect(share.share).toBeCloseTo(25 / 30, 9)
  })

  it('gives nothing at and beyond three times the tolerance', () => {
    expect(suggestAccuracyPoints(ten, { observed: 4.35, expected: 3.0, tolerancePercent: 15 })).toBe(0)
    expect(suggestAccuracyPoints(ten, { observed: 12, expected: 3.0, tolerancePercent: 15 })).toBe(0)
    expect(suggestAccuracyPoints(ten, { observed: 0, expected: 3.0, tolerancePercent: 15 })).toBe(0)
  })

  it('scales with the criterion and the course’s tolerance', () => {
    expect(suggestAccuracyPoints({ maxPoints: 6 }, { observed: 3.9, expected: 3.0, tolerancePercent: 15 })).toBe(3)
    // A 10 % tolerance makes the same 30 % deviation worth nothing.
    expect(suggestAccuracyPoints(ten, { observed: 3.9, expected: 3.0, tolerancePercent: 10 })).toBe(0)
  })

  it('makes no suggestion without a key factor or a literature value', () => {
    expect(suggestAccuracyPoints(ten, { observed: null, expected: 3.0, tolerancePercent: 15 })).toBeNull()
    expect(suggestAccuracyPoints(ten, { observed: 3.0, expected: null, tolerancePercent: 15 })).toBeNull()
    expect(suggestAccuracyPoints(ten, { observed: 3.0, expected: 0, tolerancePercent: 15 })).toBeNull()
    expect(accuracyShare({ observed: Number.NaN, expected: 3, tolerancePercent: 15 })).toEqual({ deviationPercent: null, share: null })
  })
})

describe('rubric scores', () => {
  it('starts from the suggestion and full marks, keeping what was given', () => {
    const input = { observed: 3.9, expected: 3.0, tolerancePercent: 15 }
    expect(startingScores(RUBRIC, input)).toEqual({ accuracy: 5, chromatogram: 6, analysis: 4 })
    expect(startingScores(RUBRIC, input, { analysis: 2 })).toEqual({ accuracy: 5, chromatogram: 6, analysis: 2 })
    expect(startingScores(RUBRIC, { ...input, observed: null })).toEqual({ chromatogram: 6, analysis: 4 })
  })

  it('refuses unknown keys and points outside 0…maxPoints, naming the criterion', () => {
    expect(rubricScoreIssues(RUBRIC, { accuracy: 10, chromatogram: 6, analysis: 4 }, { requireAll: true })).toEqual([])
    expect(rubricScoreIssues(RUBRIC, { chromatogram: 7 })).toEqual([
      { field: 'scores.chromatogram', message: 'Chromatogram and peak assignment: give 0 to 6 points' },
    ])
    expect(rubricScoreIssues(RUBRIC, { analysis: -1 })[0]!.field).toBe('scores.analysis')
    expect(rubricScoreIssues(RUBRIC, { style: 3 })).toEqual([{ field: 'scores.style', message: 'Not a criterion of this course’s rubric' }])
    expect(rubricScoreIssues(RUBRIC, { accuracy: 10 }, { requireAll: true }).map((i) => i.field)).toEqual(['scores.chromatogram', 'scores.analysis'])
  })

  it('totals over the rubric only', () => {
    expect(rubricTotal(RUBRIC, { accuracy: 8.3, chromatogram: 6, analysis: 3.5 })).toBe(17.8)
    expect(rubricTotal(RUBRIC, { accuracy: 10, extra: 100 })).toBe(10)
    expect(rubricMaximum(RUBRIC)).toBe(20)
  })
})
