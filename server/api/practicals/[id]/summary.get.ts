import { idParamsSchema } from '#shared/types/fields'
import { summaryQuerySchema, type PracticalSummary } from '#shared/types/summary'
import { practicalSummaryJson, requireSummaryAccess } from '../../../services/results'

// Public contract: the class-wide factors with their spread, the outliers by the course's test
// (or ?method=), the exclusions, and the caller's sections one by one. The JSON is written where
// it was computed (at 20,000 results, in the engine worker) and sent as it is, compressed once.
// The scope check reads the class's fingerprint too: a remembered answer costs one statement.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'ta', 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  const { scope, fingerprint } = await requireSummaryAccess(event, id)
  const query = readQueryAs(event, summaryQuerySchema)
  const { method, withoutOutliers, maxOutliers } = query
  const answer = await practicalSummaryJson(scope, { method, withoutOutliers, maxOutliers }, fingerprint)
  return sendJsonBytes<PracticalSummary>(event, answer)
})
