import type { ReleasePolicy } from '../../database/schema'

export interface ReleaseFacts {
  /** A TA or instructor has reviewed this version. */
  reviewed: boolean
  /** The student's section's due date for the practical. */
  dueAt: Date | null
  /** Set when the instructor released the practical (manual policy). */
  practicalReleasedAt: Date | null
}

/**
 * Whether a student may see the scores and comments of a reviewed result, by the course's
 * release policy. A return's reason is always shown: the student needs it to resubmit.
 */
export function scoresReleased(policy: ReleasePolicy, facts: ReleaseFacts, now = new Date()): boolean {
  if (!facts.reviewed) return false
  switch (policy) {
    case 'on-review': return true
    case 'after-due': return facts.dueAt === null || now >= facts.dueAt
    case 'manual': return facts.practicalReleasedAt !== null
  }
}
