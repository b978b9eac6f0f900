// Grading rules shared by the review form and the review routes. Pure: plain data in, plain data
// out, so the browser shows exactly the suggestion and the checks the server applies.

export interface GradingCriterion {
  key: string
  label: string
  maxPoints: number
  kind: 'accuracy' | 'manual'
}

export interface AccuracyInput {
  /** The run's key factor (2°:1° or 3°:1°). */
  observed: number | null
  /**
   * The expected value of the same factor: the one implied by the substrate's reference
   * distribution for the method's reagent when there is one (see `Expectation` in
   * submission.ts), else the method's literature value from the class model, which for a
   * haloalkane ignores the halogen already on the chain.
   */
  expected: number | null
  /** The course's tolerance, in percent of the expected value. */
  tolerancePercent: number
}

export interface AccuracySuggestion {
  /** |observed − expected| / expected, in percent; null when it cannot be computed. */
  deviationPercent: number | null
  /** Share of the criterion's points, 0…1; null when no suggestion can be made. */
  share: number | null
}

// Float noise must not cost a student a point at the boundary (0.45 / 3 is 0.15000000000000002).
const EPSILON = 1e-9

/**
 * The course's accuracy rule: full points when the relative deviation from the expected value
 * is within the tolerance, falling in a straight line to nothing at three times the tolerance.
 */
export function accuracyShare(input: AccuracyInput): AccuracySuggestion {
  const { observed, expected, tolerancePercent } = input
  if (observed === null || expected === null || !Number.isFinite(observed) || !(expected > 0) || !(tolerancePercent > 0)) {
    return { deviationPercent: null, share: null }
  }
  const deviation = Math.abs(observed - expected) / expected
  const tolerance = tolerancePercent / 100
  let share: number
  if (deviation <= tolerance + EPSILON) share = 1
  else if (deviation >= 3 * tolerance - EPSILON) share = 0
  else share = (3 * tolerance - deviation) / (2 * tolerance)
  return { deviationPercent: deviation * 100, share }
}

/** Points are kept to one decimal place, so a suggestion reads the same on every screen. */
export function roundPoints(points: number): number {
  return Math.round(points * 10) / 10
}

/** The suggested points for one accuracy criterion, or null when the run has no key factor. */
export function suggestAccuracyPoints(criterion: Pick<GradingCriterion, 'maxPoints'>, input: AccuracyInput): number | null {
  const { share } = accuracyShare(input)
  return share === null ? null : roundPoints(share * criterion.maxPoints)
}

/**
 * Scores to start a review from: accuracy criteria from the tolerance rule, the others at full
 * marks unless `given` says otherwise. Accuracy criteria without a suggestion are left out.
 */
export function startingScores(
  rubric: GradingCriterion[],
  input: AccuracyInput,
  given: Record<string, number> = {},
): Record<string, number> {
  const scores = judgedScores(rubric, input, given)
  for (const c of rubric) if (c.kind === 'manual' && scores[c.key] === undefined) scores[c.key] = c.maxPoints
  return scores
}

/**
 * Scores a bulk acceptance may give: only what the server can judge (accuracy criteria, from the
 * tolerance rule) and what the reviewer gave for all of them. Criteria that need a person's
 * reading (kind 'manual': the chromatogram, the calculation and discussion) stay out, to be marked
 * in a later pass; an accuracy criterion without a suggestion stays out too.
 */
export function judgedScores(
  rubric: GradingCriterion[],
  input: AccuracyInput,
  given: Record<string, number> = {},
): Record<string, number> {
  const scores: Record<string, number> = {}
  for (const c of rubric) {
    if (given[c.key] !== undefined) scores[c.key] = given[c.key]!
    else if (c.kind === 'accuracy') {
      const suggested = suggestAccuracyPoints(c, input)
      if (suggested !== null) scores[c.key] = suggested
    }
  }
  return scores
}

/** Criteria not scored yet: shown as "to mark" until a reviewer gives them. */
export function criteriaToMark(rubric: GradingCriterion[], scores: Record<string, number>): GradingCriterion[] {
  return rubric.filter((c) => typeof scores[c.key] !== 'number')
}

export interface ScoreIssue {
  field: string
  message: string
}

/**
 * Checks scores against the rubric: known keys only, each within 0…maxPoints, and (for an
 * acceptance) every criterion scored. Each issue names `scores.<key>` and the criterion.
 */
export function rubricScoreIssues(
  rubric: GradingCriterion[],
  scores: Record<string, number>,
  options: { requireAll?: boolean } = {},
): ScoreIssue[] {
  const issues: ScoreIssue[] = []
  const byKey = new Map(rubric.map((c) => [c.key, c]))
  for (const [key, value] of Object.entries(scores)) {
    const criterion = byKey.get(key)
    if (!criterion) {
      issues.push({ field: `scores.${key}`, message: 'Not a criterion of this course’s rubric' })
    } else if (!Number.isFinite(value) || value < 0 || value > criterion.maxPoints) {
      issues.push({ field: `scores.${key}`, message: `${criterion.label}: give 0 to ${criterion.maxPoints} points` })
    }
  }
  if (options.requireAll) {
    for (const c of rubric) {
      if (scores[c.key] === undefined) issues.push({ field: `scores.${c.key}`, message: `${c.label}: give a score` })
    }
  }
  return issues
}

/** The total over the rubric's criteria (unknown keys never count). */
export function rubricTotal(rubric: GradingCriterion[], scores: Record<string, number>): number {
  return roundPoints(rubric.reduce((sum, c) => sum + (scores[c.key] ?? 0), 0))
}

/** The most a run can score on this rubric. */
export function rubricMaximum(rubric: GradingCriterion[]): number {
  return rubric.reduce((sum, c) => sum + c.maxPoints, 0)
}
