import type { ResultsListItem } from '#shared/types/results'
import { resultsList } from '../../services/results'

// The practicals whose class results the caller may read (instructors: their courses; TAs:
// practicals run in their sections), each with n and its headline factor over the whole class.
export default defineEventHandler(async (event): Promise<ResultsListItem[]> => {
  const me = requireRole(event, 'instructor', 'ta')
  return resultsList(useDb(), me)
})
