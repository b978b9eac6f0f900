// Notifications that are not a reply to one action: the TAs' daily summary of new work, and
// each person's choice about it.
export { queueTaSummaries, taSummaryMessage } from './ta-summary'
export { dailySummaryChoice, setDailySummary } from './preferences'
