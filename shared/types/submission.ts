import { z } from 'zod'
import { rubricScoresSchema } from './course'
import { blockText, instantField } from './fields'
import type { KeyFactor } from '../utils/key-factor'

export type SubmissionStatusName = 'pending' | 'accepted' | 'returned'
export type FlagSeverity = 'info' | 'warning' | 'danger'

// The labels live in lib/labels.ts (zod-free, for pages that only show them).
export { SUBMISSION_STATUS_LABELS } from './lib/labels'

export interface FlagView {
  code: string
  severity: FlagSeverity
  message: string
}

export interface ResultView {
  molePercents: Array<{ smiles: string, percent: number }>
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
}

/** POST /api/practicals/:id/submissions (public contract), plus a few extra fields. */
export interface SubmissionCreated {
  id: number
  version: number
  status: SubmissionStatusName
  result: ResultView
  flags: FlagView[]
  late: boolean
  kind: 'peak-table' | 'trace'
  /** Set when the same file was already the latest version: nothing new was stored. */
  identicalTo?: number
}

export interface PeakView {
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  /** Product SMILES, 'solvent', 'starting-material', or null (unassigned). */
  assignedTo: string | null
}

/** The full computed result kept with each version. */
export interface StoredResult extends ResultView {
  relative: Array<{ smiles: string, relativeReactivity: number | null }>
  conversion: number | null
  unassignedPercent: number
  warnings: string[]
  keyFactor: KeyFactor
}

/** What a run is judged against, as pages show it (see `Expectation` in shared/utils/submission.ts). */
export interface ExpectationView {
  basis: 'reference' | 'class-model'
  /** To follow "compared with": "the reference distribution from …", "the class model (1° : 2° : 3° per H) …". */
  description: string
  percents: Array<{ smiles: string, percent: number }>
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
}

export interface ProductView {
  smiles: string
  /** Position letter, as in the depiction. */
  label: string
  /** The product's name ("1,3-dichlorobutane"), shown before the SMILES; null when none is known. */
  name: string | null
  hydrogens: number
  carbonClass: string
}

/** A preview is the same computation, nothing stored. */
export interface SubmissionPreview extends ResultView {
  kind: 'peak-table' | 'trace'
  peaks: PeakView[]
  flags: FlagView[]
  relative: StoredResult['relative']
  conversion: number | null
  unassignedPercent: number
  warnings: string[]
  predicted: Array<{ smiles: string, percent: number }>
  statistical: Array<{ smiles: string, percent: number }>
  products: ProductView[]
  expected: ExpectationView
  /** What the product mixture is made of, for the conversion's wording ("dichlorides"). */
  productKind: string
  late: boolean
}

export const reviewInputSchema = z.object({
  decision: z.enum(['accept', 'return']),
  reason: blockText(2000).optional(),
  comment: blockText(5000).default(''),
  scores: rubricScoresSchema.default({}),
  /** A return's due time for the next upload; without it, the course's number of days from now. */
  resubmitDueAt: instantField().optional(),
}).superRefine((r, ctx) => {
  if (r.decision === 'return' && !r.reason) {
    ctx.addIssue({ code: 'custom', path: ['reason'], message: 'Say why it is returned, so the student can fix it' })
  }
})
export type ReviewInput = z.input<typeof reviewInputSchema>

export const exclusionInputSchema = z.object({
  reason: blockText(2000).min(3, 'Give the reason for excluding this run'),
})
