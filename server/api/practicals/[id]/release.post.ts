import { idParamsSchema } from '#shared/types/fields'
import type { ReleaseView } from '#shared/types/review'
import { setPracticalRelease } from '../../../services/review'

// Manual release policy: the instructor shows students their scores and comments for a practical.
export default defineEventHandler(async (event): Promise<ReleaseView> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id, 'manage')
  return setPracticalRelease(useDb(), actorOf(event), scope, true)
})
