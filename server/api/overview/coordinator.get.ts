import type { Overview } from '#shared/types/overview'
import { nextLabCard, scheduleAhead, stockroomCards } from '../../services/overview'

// The coordinator's first screen: what to order, the waste to expect, the next practical.
export default defineEventHandler(async (event): Promise<Overview> => {
  const me = requireRole(event, 'coordinator')
  const [stock, schedule] = await Promise.all([stockroomCards(me), scheduleAhead(me)])
  return { role: me.role, name: me.name, cards: [...stock, nextLabCard(schedule)] }
})
