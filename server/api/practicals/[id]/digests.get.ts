import { idParamsSchema } from '#shared/types/fields'
import type { DigestHistoryItem } from '#shared/types/results'
import { digestHistory } from '../../../services/digests'

// The digests sent for a practical, in the caller's sections, with each message's delivery.
export default defineEventHandler(async (event): Promise<DigestHistoryItem[]> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  return digestHistory(scope)
})
