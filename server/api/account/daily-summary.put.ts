import { dailySummarySchema } from '#shared/types/auth'
import { setDailySummary } from '../../services/notifications'

// Turns one's own daily summary on or off (no one else's).
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { dailySummary } = await readBodyAs(event, dailySummarySchema)
  return setDailySummary(useDb(), actorOf(event), dailySummary)
})
