import { idParamsSchema } from '#shared/types/fields'
import { reviewInputSchema } from '#shared/types/submission'
import type { ReviewSaved } from '#shared/types/review'
import { requireReviewableSubmission, saveSubmissionReview } from '../../../services/review'

// Accept with rubric scores (total computed here) or return for resubmission with a reason and a
// new due time; a return mails the students of the work unit, with a link to their results page.
export default defineEventHandler(async (event): Promise<ReviewSaved> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const { scope, submission } = await requireReviewableSubmission(event, id)
  const input = await readBodyAs(event, reviewInputSchema)
  return saveSubmissionReview(useDb(), actorOf(event), scope, submission, input, { appUrl: useRuntimeConfig(event).public.appUrl })
})
