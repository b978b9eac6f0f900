import { idParamsSchema } from '#shared/types/fields'
import { requireReviewableSubmission, setSubmissionExclusion } from '../../../services/review'
// Count an excluded run in the class statistics again.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const { submission } = await requireReviewableSubmission(event, id)
  return setSubmissionExclusion(useDb(), actorOf(event), submission, null)
})
