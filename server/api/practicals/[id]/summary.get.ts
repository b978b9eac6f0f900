import { idParamsSchema } from '#shared/types/fields'
import { summaryQuerySchema } from '#shared/types/summary'
import { practicalSummary } from '../../../services/results'

// Public contract: the class-wide factors with their spread, the outliers by the course's test
// (or ?method=), the exclusions, and the caller's sections one by one.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'ta', 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  const query = readQueryAs(event, summaryQuerySchema)
  return practicalSummary(scope, { method: query.method, withoutOutliers: query.withoutOutliers, maxOutliers: query.maxOutliers })
})
