import { idParamsSchema } from '#shared/types/fields'
import { queueQuerySchema, type QueueResponse } from '#shared/types/review'
import { requireReviewQueuePage, reviewQueueJson } from '../../../services/review'

// The review queue of one practical: each work unit's latest version in the caller's sections,
// what needs attention first. Filters: ?section=, ?status=, ?flag= (a flag code, "outlier", or
// "any" for every run that needs attention). The scope check and every read are one statement;
// the answer is remembered by what it is made of (reviewQueueJson).
export default defineEventHandler(async (event): Promise<QueueResponse> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const page = await requireReviewQueuePage(event, id)
  const query = readQueryAs(event, queueQuerySchema)
  return sendJsonBytes<QueueResponse>(event, await reviewQueueJson(page, query))
})
