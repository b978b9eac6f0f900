import { addDays, todayIn, zonedInstant } from './dates'

// When a returned run is due again. A return gives the work unit a new due time (the reviewer's,
// or the course's number of days, at the end of that day in the course's zone); until a later
// accept, an upload is late only after the later of that time and the section's own due time.

export const RESUBMIT_DAYS_DEFAULT = 3
export const RESUBMIT_DAYS_MAX = 60
/** How far past the return a reviewer may set the new due time. */
export const RESUBMIT_MAX_MS = RESUBMIT_DAYS_MAX * 86_400_000 + 86_400_000

/** 23:59 on the day `days` after today, in `zone`. */
export function defaultResubmitDue(now: Date, days: number, zone: string): Date {
  return zonedInstant(addDays(todayIn(zone, now), days), '23:59', zone)
}

/** Why a new due time cannot be used, or null: it must lie after now (a minute's grace) and within the limit. */
export function resubmitDueProblem(due: Date, now: Date): string | null {
  if (due.getTime() < now.getTime() - 60_000) return 'Pick a time in the future, so the students can upload again'
  if (due.getTime() > now.getTime() + RESUBMIT_MAX_MS) return `Pick a time at most ${RESUBMIT_DAYS_MAX} days from now`
  return null
}

export interface LastDecision {
  decision: 'accept' | 'return'
  resubmitDueAt: Date | null
}

/**
 * The due time a new upload of a unit is judged against: the section's, or, while the unit's
 * latest decision is a return with a due time, the later of the two (a return never shortens).
 */
export function uploadDueAt(sectionDue: Date | null, last: LastDecision | null | undefined): Date | null {
  const returned = last?.decision === 'return' ? last.resubmitDueAt : null
  if (!returned) return sectionDue
  if (!sectionDue) return returned
  return returned.getTime() > sectionDue.getTime() ? returned : sectionDue
}
