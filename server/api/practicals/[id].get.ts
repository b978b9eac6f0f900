import { idParamsSchema } from '#shared/types/fields'
import type { PracticalDetail } from '#shared/types/practical'
import { practicalDetail } from '~~/server/services/practicals'

// One practical with the product windows a student needs to read their chromatogram. dueAt is
// the caller's own section's due date for a student, else the latest one they can see.
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return practicalDetail(await requirePracticalAccess(event, id))
})
