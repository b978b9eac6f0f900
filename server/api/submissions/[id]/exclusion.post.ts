import { idParamsSchema } from '#shared/types/fields'
import { exclusionInputSchema } from '#shared/types/submission'
import { requireReviewableSubmission, setSubmissionExclusion } from '../../../services/review'

// Leave a run out of the class statistics, with the reason; it stays visible and gradable.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const { submission } = await requireReviewableSubmission(event, id)
  const { reason } = await readBodyAs(event, exclusionInputSchema)
  return setSubmissionExclusion(useDb(), actorOf(event), submission, reason)
})
