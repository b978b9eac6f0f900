import { idParamsSchema } from '#shared/types/fields'
import type { ReleaseView } from '#shared/types/review'
import { setPracticalRelease } from '../../../services/review'

// Withdraw a manual release: students no longer see scores and comments (return reasons stay).
export default defineEventHandler(async (event): Promise<ReleaseView> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id, 'manage')
  return setPracticalRelease(useDb(), actorOf(event), scope, false)
})
