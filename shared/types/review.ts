import { z } from 'zod'
import type { FlagView, PeakView, StoredResult, SubmissionStatusName } from './submission'
import { rubricScoresSchema, type OutlierTestName } from './course'
import { recordId, recordIdParam } from './fields'
import type { KeyFactor } from '../utils/key-factor'

// The TA review side: queue, detail, bulk acceptance, grade export. The review and exclusion
// bodies themselves are `reviewInputSchema` and `exclusionInputSchema` in ./submission.

export type ReviewFactorKey = KeyFactor
export { KEY_FACTOR_LABELS } from './lib/labels'

export const queueQuerySchema = z.object({
  section: recordIdParam().optional(),
  status: z.enum(['pending', 'accepted', 'returned']).optional(),
  flag: z.string().trim().regex(/^[a-z0-9-]{1,60}$/, 'Not a flag code').optional(),
})
export type QueueQuery = z.input<typeof queueQuerySchema>

export const detailQuerySchema = z.object({
  compare: recordIdParam().optional(),
})

export const bulkAcceptSchema = z.object({
  submissionIds: z.array(recordId('Pick submissions from the list'))
    .min(1, 'Choose at least one submission').max(500, 'At most 500 at a time'),
  /** Points the reviewer gives every chosen run; criteria left out that need a person's reading stay "to mark". */
  scores: rubricScoresSchema.default({}),
})
export type BulkAcceptInput = z.input<typeof bulkAcceptSchema>

/** A stored flag, or the dynamic outlier flag with its test's numbers. */
export interface ReviewFlag extends FlagView {
  test?: OutlierTestName
  statistic?: number
  critical?: number
  /** Generalized ESD: the step that removed the value. */
  step?: number
}

export interface UnitMember {
  id: number
  name: string
  email: string
}

export interface UnitView {
  key: string
  /** "Ada Quill & Ben Roe" or one name. */
  label: string
  members: UnitMember[]
  station: number | null
}

export interface ExclusionView {
  at: string
  by: string | null
  reason: string
}

export interface QueueRow {
  id: number
  unit: UnitView
  section: { id: number, code: string }
  version: number
  submittedAt: string
  late: boolean
  status: SubmissionStatusName
  keyFactor: number | null
  flags: ReviewFlag[]
  /** 2 blocking flag, 1 warning (an outlier counts), 0 clean. */
  attention: number
  excluded: ExclusionView | null
  /** Latest, pending, no flag, no outlier, not excluded: may be accepted in bulk. */
  clean: boolean
  /** Accepted, with criteria that need a person's reading still to mark (left by a bulk acceptance). */
  toMark: boolean
}

export interface OutlierRun {
  test: OutlierTestName
  applied: boolean
  /** Results the test ran over (latest pending or accepted, not excluded, whole class). */
  n: number
  alpha: number
  zscoreLimit: number
  /** Generalized ESD: the most outliers looked for (r). */
  maxOutliers: number | null
  note: string | null
}

export interface QueueCounts {
  total: number
  pending: number
  accepted: number
  returned: number
  flagged: number
  excluded: number
}

export interface QueuePractical {
  id: number
  title: string
  course: { id: number, code: string, title: string, term: string }
  /** The course's IANA zone: times are shown in it, the same on server and browser. */
  timezone: string
  keyFactor: ReviewFactorKey
  /** The key factor runs are judged against (reference distribution, else the class model). */
  expected: number | null
  /** "the reference distribution from …" or "the class model (1° : 2° : 3° per H) …". */
  comparedWith: string
  expectedBasis: 'reference' | 'class-model'
  releasePolicy: 'on-review' | 'after-due' | 'manual'
  resultsReleasedAt: string | null
}

export interface QueueResponse {
  practical: QueuePractical
  role: 'owner' | 'ta'
  sections: Array<{ id: number, code: string }>
  rows: QueueRow[]
  /** Over the caller's rows in the chosen section, before the status and flag filters. */
  counts: QueueCounts
  flagCodes: Array<{ code: string, count: number }>
  outliers: OutlierRun
}

export interface ReviewPracticalItem {
  id: number
  title: string
  course: { id: number, code: string, title: string, term: string }
  sections: string[]
  counts: QueueCounts
}

export interface VersionView {
  id: number
  version: number
  submittedAt: string
  fileName: string
  status: SubmissionStatusName
  keyFactor: number | null
  late: boolean
  excluded: boolean
}

export interface PeakChange {
  assignedTo: string | null
  before: { retentionTime: number, area: number } | null
  after: { retentionTime: number, area: number } | null
  change: 'added' | 'removed' | 'changed'
}

export interface VersionDiff {
  fromId: number
  fromVersion: number
  toId: number
  toVersion: number
  peaks: PeakChange[]
  unchangedPeaks: number
  molePercents: Array<{ smiles: string, label: string, before: number | null, after: number | null, delta: number | null }>
  factors: Array<{ name: ReviewFactorKey, before: number | null, after: number | null }>
  flagsAdded: string[]
  flagsRemoved: string[]
}

export interface ReviewView {
  id: number
  submissionId: number
  version: number
  reviewer: string
  createdAt: string
  decision: 'accept' | 'return'
  reason: string | null
  comment: string
  scores: Record<string, number>
  total: number | null
  /** A return's due time for the unit's next upload (ISO); null for an accept. */
  resubmitDueAt: string | null
}

export interface RubricView {
  key: string
  label: string
  maxPoints: number
  kind: 'accuracy' | 'manual'
}

export interface AccuracySuggestionView {
  tolerancePercent: number
  observed: number | null
  /** The expected key factor the score is judged against. */
  expected: number | null
  /** What that value comes from, to follow "compared with". */
  comparedWith: string
  deviationPercent: number | null
  /** Suggested points per accuracy criterion key (absent: no suggestion possible). */
  scores: Record<string, number>
}

export interface DistributionRow {
  smiles: string
  label: string
  /** The product's name, shown before its SMILES; null when none is known. */
  name: string | null
  carbonClass: string
  hydrogens: number
  observed: number | null
  statistical: number
  /** The class model's share (n·r per class). */
  predicted: number
  /** The substrate's reference distribution for the reagent; null when it has none. */
  reference: number | null
}

export interface SubmissionDetail {
  id: number
  version: number
  latestId: number
  isLatest: boolean
  status: SubmissionStatusName
  submittedAt: string
  submittedBy: string
  late: boolean
  kind: 'peak-table' | 'trace'
  fileName: string
  practical: QueuePractical & { substrate: { name: string, smiles: string }, method: { name: string, reagent: string } }
  unit: UnitView
  section: { id: number, code: string }
  peaks: PeakView[]
  result: StoredResult
  keyFactor: number | null
  flags: ReviewFlag[]
  attention: number
  outliers: OutlierRun
  distribution: DistributionRow[]
  windows: Array<{ productSmiles: string, rtMin: number, rtMax: number }>
  /** The solvent and starting-material windows, so a chart can show where they were expected. */
  referenceWindows: Array<{ kind: 'solvent' | 'starting-material', rtMin: number, rtMax: number }>
  versions: VersionView[]
  diff: VersionDiff | null
  reviews: ReviewView[]
  rubric: RubricView[]
  suggestion: AccuracySuggestionView
  excluded: ExclusionView | null
  /** The next submission waiting for review in the caller's queue, in queue order. */
  nextPendingId: number | null
  pendingCount: number
  /** What a return offers: the course's days, and the due time they give from now (ISO). */
  resubmit: { days: number, defaultDueAt: string }
}

export interface ReviewSaved {
  id: number
  status: SubmissionStatusName
  reviewId: number
  scores: Record<string, number>
  total: number | null
  /** A return's due time for the unit's next upload (ISO); null for an accept. */
  resubmitDueAt: string | null
}

export interface BulkAcceptResult {
  /** `total` is null while `toMark` (criteria keys) is not empty. */
  accepted: Array<{ id: number, scores: Record<string, number>, total: number | null, toMark: string[] }>
  skipped: Array<{ id: number, reason: string }>
}

export interface ReleaseView {
  practicalId: number
  resultsReleasedAt: string | null
}

/** Short names for flag codes, for badges and the flag filter; the flag's message says more. */
export const REVIEW_FLAG_NAMES: Record<string, string> = {
  'outlier': 'outlier in the class',
  'missing-product': 'missing product',
  'split-peak': 'split peak',
  'unassigned-area': 'unassigned area',
  'area-percent-sum': 'area % sum',
  'retention-drift': 'retention drift',
  'negative-value': 'negative value',
  'non-numeric': 'non-numeric value',
  'no-product-peaks': 'no product peaks',
  'no-peaks': 'no peaks',
  'missing-solvent': 'no solvent peak',
  'missing-starting-material': 'no starting-material peak',
  'overlapping-windows': 'overlapping windows',
  'overlap': 'overlapping peaks',
  'solvent-counted': 'solvent counted as product',
  'starting-material-counted': 'starting material counted as product',
  'far-from-prediction': 'far from prediction',
}

export function reviewFlagName(code: string): string {
  return REVIEW_FLAG_NAMES[code] ?? code.replace(/-/g, ' ')
}
