// The course's chosen outlier test applied to a class's results, by submission id. Outliers are
// flagged, never dropped: excluding a run is a person's decision, recorded with its reason.
import { dixonQTest, grubbsTest, modifiedZScores, StatisticsError } from './statistics'
import { gesdTest } from './gesd'
import type { OutlierTestName } from '../types/course'

export interface OutlierSettings {
  test: OutlierTestName
  /** Generalized ESD and Grubbs α, Dixon 1 − confidence (0.05 or 0.10). */
  alpha: number
  /** Modified z-score limit, usually 3.5. */
  zscoreLimit: number
  /** Generalized ESD's upper bound r; absent: gesdDefaultMaxOutliers(n). */
  maxOutliers?: number | null
}

export interface OutlierFinding {
  submissionId: number
  value: number
  /** R for the generalized ESD, G for Grubbs, Q for Dixon, M for the modified z-score. */
  statistic: number
  critical: number
  /** Generalized ESD: the step that removed this value (its R and λ are that step's). */
  step?: number
}

export interface OutlierReport {
  test: OutlierTestName
  /** False when the test could not run (too few or too many values): see note. */
  applied: boolean
  outliers: OutlierFinding[]
  note: string | null
  /** Generalized ESD: the r used. */
  maxOutliers: number | null
}

export function findOutliers(values: Array<{ submissionId: number, value: number }>, settings: OutlierSettings): OutlierReport {
  const xs = values.map((v) => v.value)
  const at = (i: number) => values[i]!
  if (settings.test === 'gesd') {
    if (xs.length < 3) {
      const note = `The generalized ESD test needs at least 3 results; there are ${xs.length}.`
      return { test: 'gesd', applied: false, outliers: [], note, maxOutliers: null }
    }
    const g = gesdTest(xs, { alpha: settings.alpha, maxOutliers: settings.maxOutliers ?? null })
    return {
      test: 'gesd',
      applied: true,
      outliers: g.steps.slice(0, g.count).map((s) => ({
        submissionId: at(s.index).submissionId, value: s.value, statistic: s.R, critical: s.lambda, step: s.step,
      })),
      note: g.note,
      maxOutliers: g.maxOutliers,
    }
  }
  if (settings.test === 'grubbs') {
    if (xs.length < 3) {
      const note = `Grubbs' test needs at least 3 results; there are ${xs.length}.`
      return { test: 'grubbs', applied: false, outliers: [], note, maxOutliers: null }
    }
    const g = grubbsTest(xs, { alpha: settings.alpha })
    return {
      test: 'grubbs',
      applied: true,
      outliers: g.steps.filter((s) => s.outlier).map((s) => ({
        submissionId: at(s.index).submissionId, value: s.value, statistic: s.G, critical: s.critical,
      })),
      note: g.note,
      maxOutliers: null,
    }
  }
  if (settings.test === 'dixon') {
    try {
      const q = dixonQTest(xs, { confidence: Math.round((1 - settings.alpha) * 100) / 100 })
      return {
        test: 'dixon',
        applied: true,
        outliers: q.outlier ? [{ submissionId: at(q.index).submissionId, value: q.value, statistic: q.q, critical: q.critical }] : [],
        note: q.note,
        maxOutliers: null,
      }
    } catch (error) {
      if (error instanceof StatisticsError) return { test: 'dixon', applied: false, outliers: [], note: error.message, maxOutliers: null }
      throw error
    }
  }
  const z = modifiedZScores(xs, { threshold: settings.zscoreLimit })
  return {
    test: 'modified-z',
    applied: z.method !== 'none',
    outliers: z.outliers.map((i) => ({
      submissionId: at(i).submissionId, value: at(i).value, statistic: z.scores[i]!, critical: settings.zscoreLimit,
    })),
    note: z.note,
    maxOutliers: null,
  }
}
