import { idParamsSchema } from '#shared/types/fields'
import type { ResultsPracticalDetail } from '#shared/types/results'
import { resultsPracticalDetail } from '../../../services/results'

// What the class results page shows beside the summary: the practical, the course's outlier
// settings, the caller's sections, and who is behind each result in those sections only.
export default defineEventHandler(async (event): Promise<ResultsPracticalDetail> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  return resultsPracticalDetail(scope)
})
