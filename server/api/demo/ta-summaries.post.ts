import { requireDemoMailbox } from '../../services/outbox'
import { runTaSummaryJob } from '../../workers/ta-summary'

// Demo and tests only (404 outside demo mode, like the demo mailbox): runs the daily summary job
// now, as the schedule would, instead of waiting for its hour. The day's keys still hold, so a
// second run the same day mails nobody again.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'coordinator')
  requireDemoMailbox(useRuntimeConfig(event))
  return runTaSummaryJob()
})
