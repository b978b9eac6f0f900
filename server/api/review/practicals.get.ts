import type { ReviewPracticalItem } from '#shared/types/review'
import { reviewPracticalItems } from '../../services/review'

// The practicals the caller reviews (owned courses; a TA's sections), with queue counts.
export default defineEventHandler(async (event): Promise<ReviewPracticalItem[]> => {
  const me = requireRole(event, 'instructor', 'ta')
  return reviewPracticalItems(event, me)
})
