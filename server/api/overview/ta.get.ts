import type { Overview } from '#shared/types/overview'
import { classResultCard, nextLabCard, reviewCards, scheduleAhead } from '../../services/overview'

// A TA's first screen: their sections' queue and the next practical they teach.
export default defineEventHandler(async (event): Promise<Overview> => {
  const me = requireRole(event, 'ta')
  const [review, schedule, results] = await Promise.all([reviewCards(event, me), scheduleAhead(me), classResultCard(event, me)])
  return { role: me.role, name: me.name, cards: [...review, ...(results ? [results] : []), nextLabCard(schedule)] }
})
