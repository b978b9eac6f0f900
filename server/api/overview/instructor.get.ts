import type { Overview } from '#shared/types/overview'
import { classResultCard, nextLabCard, reviewCards, scheduleAhead, stockroomCards } from '../../services/overview'

// The instructor's first screen: the review queue, the next practical, what the stockroom lacks.
export default defineEventHandler(async (event): Promise<Overview> => {
  const me = requireRole(event, 'instructor')
  const [review, schedule, stock, results] = await Promise.all([
    reviewCards(event, me), scheduleAhead(me), stockroomCards(me), classResultCard(event, me),
  ])
  return { role: me.role, name: me.name, cards: [...review, ...(results ? [results] : []), nextLabCard(schedule), stock[0]!] }
})
