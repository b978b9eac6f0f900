import { idParamsSchema } from '#shared/types/fields'
import { detailQuerySchema, type SubmissionDetail } from '#shared/types/review'
import { buildSubmissionDetail, requireReviewableSubmission } from '../../services/review'

// One submission for its reviewer; ?compare=<id of another version> picks the diff's other side.
export default defineEventHandler(async (event): Promise<SubmissionDetail> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const { scope, submission } = await requireReviewableSubmission(event, id)
  const { compare } = readQueryAs(event, detailQuerySchema)
  return buildSubmissionDetail(scope, submission, compare)
})
