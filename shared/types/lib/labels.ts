// Names of weekdays, outlier tests, release policies, item roles, upload states and selectivity figures as pages show them,
// without zod. The schema files (section.ts, course.ts, review.ts, results.ts, practical.ts, submission.ts) re-export them; a page that
// only shows a label imports it from here, so it does not load the schemas and zod with them.
// Not auto-imported (a folder below shared/types): import it explicitly.
import type { HeadlineStatistic } from '../../utils/headline'
import type { KeyFactor } from '../../utils/key-factor'

export const WEEKDAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const

// The generalized ESD test comes first: it is the default for new courses (it finds several
// outliers at once, where repeated Grubbs' tests let two bad runs hide each other).
export const OUTLIER_TESTS = ['gesd', 'grubbs', 'dixon', 'modified-z'] as const
type OutlierTest = (typeof OUTLIER_TESTS)[number]
export const DEFAULT_OUTLIER_TEST: OutlierTest = 'gesd'
export const OUTLIER_TEST_LABELS: Record<OutlierTest, string> = {
  'gesd': 'Generalized ESD (several outliers)',
  'grubbs': "Grubbs' test (two-sided, iterative)",
  'dixon': "Dixon's Q test (r10, 3–10 results)",
  'modified-z': 'Modified z-score (median and MAD)',
}

export const RELEASE_POLICIES = ['on-review', 'after-due', 'manual'] as const
export const RELEASE_POLICY_LABELS: Record<(typeof RELEASE_POLICIES)[number], string> = {
  'on-review': 'As soon as a TA has reviewed the result',
  'after-due': 'After the due date, once reviewed',
  'manual': 'When the instructor releases the practical',
}

export const KEY_FACTOR_LABELS: Record<KeyFactor, string> = {
  secondaryToPrimary: '2°:1°',
  tertiaryToPrimary: '3°:1°',
}
export const RESULTS_FACTOR_LABELS = KEY_FACTOR_LABELS
export const RESULTS_STATISTIC_SYMBOLS: Record<OutlierTest, string> = { 'gesd': 'R', 'grubbs': 'G', 'dixon': 'Q', 'modified-z': '|M|' }

export const ITEM_ROLES = ['substrate', 'halogenating-agent', 'initiator', 'solvent', 'wash', 'drying-agent', 'other'] as const
export const ITEM_ROLE_LABELS: Record<(typeof ITEM_ROLES)[number], string> = {
  'substrate': 'Substrate',
  'halogenating-agent': 'Halogenating agent',
  'initiator': 'Initiator',
  'solvent': 'Solvent',
  'wash': 'Wash',
  'drying-agent': 'Drying agent',
  'other': 'Other',
}

export const SUBMISSION_STATUS_LABELS: Record<'pending' | 'accepted' | 'returned', string> = {
  pending: 'Waiting for review',
  accepted: 'Accepted',
  returned: 'Returned for resubmission',
}

export const HEADLINE_LABELS: Record<HeadlineStatistic, string> = {
  'geometric-mean': 'Geometric mean',
  'median': 'Median',
}
