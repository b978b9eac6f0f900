import { dailySummaryChoice } from '../../services/notifications'

// The signed-in person's choice about the daily summary of new runs.
export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  return dailySummaryChoice(useDb(), me.id)
})
