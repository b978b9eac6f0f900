import { idParamsSchema } from '#shared/types/fields'
import { bulkAcceptSchema, type BulkAcceptResult } from '#shared/types/review'
import { acceptCleanInBulk, requireReviewerOf, reviewQueueOf } from '../../../../services/review'

// Accept several clean submissions at once; the answer says which were accepted and why the
// others were skipped.
export default defineEventHandler(async (event): Promise<BulkAcceptResult> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireReviewerOf(event, id)
  const { submissionIds, scores } = await readBodyAs(event, bulkAcceptSchema)
  const { chemistry, rows } = await reviewQueueOf(scope)
  const queue = { rows, expected: chemistry.expected.factors[chemistry.keyFactor] }
  return acceptCleanInBulk(useDb(), actorOf(event), scope, queue, submissionIds, scores)
})
