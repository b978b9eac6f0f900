import { idParamsSchema } from '#shared/types/fields'
import type { PracticalDetail } from '#shared/types/practical'
import { readPracticalDetail } from '~~/server/services/practicals'

// One practical with the product windows a student needs to read their chromatogram. dueAt is
// the caller's own section's due date for a student, else the latest one they can see. The
// scope check and the page's rows are one statement (requirePracticalAccessWith).
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return readPracticalDetail(event, id)
})
