import { crossTermQuerySchema, type CrossTermComparison } from '#shared/types/results'
import { crossTermComparison } from '../../services/results'

// The same substrate and method in every course and term, so an instructor sees whether this
// term's class is typical. Aggregates only; the practical asked about must be the caller's own.
export default defineEventHandler(async (event): Promise<CrossTermComparison> => {
  requireRole(event, 'instructor')
  const { practicalId } = readQueryAs(event, crossTermQuerySchema)
  const scope = await requirePracticalAccess(event, practicalId, 'manage')
  return crossTermComparison(scope)
})
