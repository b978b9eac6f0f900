import { z } from 'zod'
import type { OutlierTestName as OutlierTest } from './course'
import type { ClassHeadline } from '../utils/headline'
import { instantField, recordIdList, recordIdParam } from './fields'
import type { KeyFactor } from '../utils/key-factor'

// Class results pages, section digests and the cross-term comparison: API types and the
// schemas shared by the forms and the routes.

export type ResultsKeyFactor = KeyFactor

export { RESULTS_FACTOR_LABELS, RESULTS_STATISTIC_SYMBOLS } from './lib/labels'

/** One line of GET /api/results: a practical the caller may see, with its headline factor. */
export interface ResultsListItem {
  practicalId: number
  title: string
  courseId: number
  courseCode: string
  term: string
  substrateName: string
  methodName: string
  keyFactor: ResultsKeyFactor
  literature: number | null
  n: number
  mean: number | null
  ci95: [number, number] | null
  median: number | null
  /** The figure the list leads with (geometric mean, or the median), as on the class page. */
  headline: ClassHeadline
  /** The last meeting of the practical in the caller's sections (YYYY-MM-DD). */
  lastMeeting: string | null
}

/** A work unit behind a result, for the caller's own sections only. */
export interface ResultsUnitLabel {
  submissionId: number
  sectionCode: string
  station: number | null
  label: string
}

/** GET /api/results/practicals/:id: what the analytics page needs beside the summary. */
export interface ResultsPracticalDetail {
  practicalId: number
  title: string
  courseId: number
  courseCode: string
  term: string
  substrate: { name: string, smiles: string }
  method: { name: string, reagent: string, temperatureC: number, source: string }
  role: 'owner' | 'ta'
  outlier: { test: OutlierTest, alpha: number, zscoreLimit: number }
  sections: Array<{ id: number, code: string, meetingDate: string }>
  units: ResultsUnitLabel[]
  canSendDigests: boolean
}

export const crossTermQuerySchema = z.object({
  practicalId: recordIdParam('Pick a practical'),
})

export interface CrossTermStats {
  n: number
  mean: number | null
  sd: number | null
  ci95: [number, number] | null
  median: number | null
  /** Each class's leading figure (flagged runs included, reviewer exclusions left out). */
  headline: ClassHeadline
}

/** One practical on the same substrate and method, in any course: aggregates only. */
export interface CrossTermRow extends CrossTermStats {
  practicalId: number
  courseCode: string
  term: string
  /** The first meeting of the practical, for ordering (YYYY-MM-DD). */
  firstMeeting: string | null
  sectionCodes: string[]
  sections: Array<CrossTermStats & { code: string }>
  /** The practical the comparison was asked for. */
  current: boolean
}

export interface CrossTermComparison {
  keyFactor: ResultsKeyFactor
  substrate: string
  reagent: string
  literature: number | null
  rows: CrossTermRow[]
}

/** The statistic each outlier test compares with its critical value (magnitudes: |M| for z). */

// Section digests.

export const DIGEST_AUDIENCES = ['student', 'staff'] as const
export type DigestAudience = (typeof DIGEST_AUDIENCES)[number]

export const digestPreviewQuerySchema = z.object({
  sectionId: recordIdParam('Pick a section'),
  audience: z.enum(DIGEST_AUDIENCES, { error: 'Choose students or staff' }),
  userId: recordIdParam('Pick a recipient').optional(),
})

export const digestSendSchema = z.object({
  sectionIds: recordIdList(200, 'section'),
  /** ISO instant; absent or null sends now. */
  sendAt: instantField('Enter a date and time').nullish(),
})
export type DigestSendInput = z.input<typeof digestSendSchema>

export interface DigestRecipient {
  userId: number
  name: string
  email: string
  audience: DigestAudience
}

export interface DigestAttachmentView {
  filename: string
  contentType: string
  /** base64, exactly as queued */
  content: string
}

/** Exactly what one recipient gets. */
export interface DigestMessage {
  to: string
  subject: string
  text: string
  html: string
  attachments: DigestAttachmentView[]
}

/** Runs the class figures count that no reviewer has decided on yet: the warning before a digest goes out. */
export interface PendingReview {
  total: number
  sections: Array<{ sectionId: number, code: string, count: number }>
}

export interface DigestPreview extends DigestMessage {
  recipient: DigestRecipient
  /** Across every section of the practical the caller sees, not only the previewed one. */
  pendingReview: PendingReview
  /** Runs the class figures in this message count. */
  countedRuns: number
  /** Everyone the section's digest goes to, to pick another preview. */
  recipients: DigestRecipient[]
}

export type DigestDelivery = 'scheduled' | 'sending' | 'sent' | 'retrying' | 'failed' | 'partly-failed'

export const DIGEST_DELIVERY_LABELS: Record<DigestDelivery, string> = {
  'scheduled': 'Waits for its time',
  'sending': 'On its way',
  'sent': 'All delivered to the mail server',
  'retrying': 'Some will retry',
  'failed': 'Gave up',
  'partly-failed': 'Some gave up',
}

export interface DigestMessageStatus {
  messageId: number
  userId: number
  to: string[]
  kind: string
  status: 'queued' | 'sending' | 'sent' | 'retrying' | 'failed'
  attempts: number
  lastError: string | null
  scheduledAt: string | null
  sentAt: string | null
}

export interface DigestHistoryItem {
  id: number
  sectionId: number
  sectionCode: string
  createdAt: string
  createdBy: string | null
  scheduledAt: string | null
  recipientCount: number
  delivery: DigestDelivery
  counts: { sent: number, waiting: number, retrying: number, failed: number }
  messages: DigestMessageStatus[]
}

export interface DigestSent {
  created: boolean
  digests: Array<{ id: number, sectionId: number, sectionCode: string, scheduledAt: string | null, recipientCount: number }>
}
