import { z } from 'zod'
import { lineText } from './fields'
import { RESUBMIT_DAYS_MAX } from '../utils/resubmit'
import { OUTLIER_TESTS, RELEASE_POLICIES } from './lib/labels'

// The names pages show live in lib/labels.ts (without zod); they are re-exported here.

export { DEFAULT_OUTLIER_TEST, OUTLIER_TEST_LABELS, OUTLIER_TESTS, RELEASE_POLICIES, RELEASE_POLICY_LABELS } from './lib/labels'
export type OutlierTestName = (typeof OUTLIER_TESTS)[number]
export type ReleasePolicyName = (typeof RELEASE_POLICIES)[number]

/** One line each on when a test fits, for the settings form. */
export const OUTLIER_TEST_HINTS: Record<OutlierTestName, string> = {
  'gesd': 'Looks for up to one result in five (at least 2) at once, so two bad runs cannot hide each other. Suits a class of any size from 3.',
  'grubbs': 'One outlier at a time, repeated. Two similar bad runs can mask each other, and with 6 or fewer results it is unreliable.',
  'dixon': 'Only for 3 to 10 results; with more or fewer it does not run (and says so).',
  'modified-z': 'Scores each result against the median and MAD, which a few far-off runs barely move.',
}

export const rubricCriterionSchema = z.object({
  key: z.string().trim().regex(/^[a-z0-9-]{1,40}$/, 'Use lower-case letters, digits and dashes'),
  label: lineText(80, 'Name the criterion'),
  maxPoints: z.number().int('Whole points only').min(1, 'At least 1 point').max(100, 'At most 100 points'),
  kind: z.enum(['accuracy', 'manual']).default('manual'),
})
export type RubricCriterionInput = z.infer<typeof rubricCriterionSchema>

export const DEFAULT_RUBRIC: RubricCriterionInput[] = [
  { key: 'accuracy', label: 'Selectivity against the literature value', maxPoints: 10, kind: 'accuracy' },
  { key: 'chromatogram', label: 'Chromatogram and peak assignment', maxPoints: 6, kind: 'manual' },
  { key: 'analysis', label: 'Calculation and discussion', maxPoints: 4, kind: 'manual' },
]

const rubricSchema = z.array(rubricCriterionSchema).min(1, 'Add at least one criterion').max(12, 'At most 12 criteria')
  .refine((items) => new Set(items.map((i) => i.key)).size === items.length, 'Each criterion needs its own key')

export const courseInputSchema = z.object({
  code: lineText(30, 'Enter the course code'),
  title: lineText(120, 'Enter the course title'),
  term: lineText(40, 'Enter the term, e.g. Spring 2027'),
  timezone: z.string().trim().min(1).max(64).refine(isTimeZone, 'Not a known time zone (e.g. America/Chicago)').default('America/Chicago'),
})
export type CourseInput = z.input<typeof courseInputSchema>

export const courseSettingsSchema = z.object({
  outlierTest: z.enum(OUTLIER_TESTS),
  outlierAlpha: z.union([z.literal(0.05), z.literal(0.1)]),
  zscoreLimit: z.number().min(1).max(10),
  accuracyTolerancePercent: z.number().min(1, 'At least 1 %').max(200, 'At most 200 %'),
  releasePolicy: z.enum(RELEASE_POLICIES),
  /** Days a returned run gets to come back before it counts as late; left out, the course keeps its own. */
  resubmitDays: z.number({ error: 'Enter a number of days' }).int('Use whole days').min(0, 'At least 0 days')
    .max(RESUBMIT_DAYS_MAX, `At most ${RESUBMIT_DAYS_MAX} days`).optional(),
  rubric: rubricSchema,
})
export type CourseSettings = z.infer<typeof courseSettingsSchema>

export const coOwnerSchema = z.object({
  email: z.string().trim().toLowerCase().max(254, 'Use at most 254 characters').email('Enter an e-mail address'),
})

/** Points per rubric criterion, keyed by the criterion's key (a course has at most 12). */
export const rubricScoresSchema = z.record(
  z.string().regex(/^[a-z0-9-]{1,40}$/),
  z.number({ error: 'Enter the points as a number' }).min(0, 'Scores are zero or more').max(1000, 'At most 1000 points'),
  { error: (issue) => (issue.code === 'invalid_key' ? 'Not a criterion key' : 'Send the scores as an object of points') },
).refine((scores) => Object.keys(scores).length <= 12, 'At most 12 scores')

function isTimeZone(value: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: value })
    return true
  } catch {
    return false
  }
}

/** GET /api/courses (public contract) */
export interface CourseListItem {
  id: number
  code: string
  title: string
  term: string
}

export interface CourseDetail extends CourseListItem, CourseSettings {
  timezone: string
  resubmitDays: number
  owners: Array<{ id: number, name: string, email: string }>
  /** The caller's relation to the course. */
  role: 'owner' | 'ta' | 'coordinator' | 'student'
}
