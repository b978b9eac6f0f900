import { idParamsSchema } from '#shared/types/fields'
import { digestPreviewQuerySchema, type DigestPreview } from '#shared/types/results'
import { digestPreview } from '../../../../services/digests'

// Exactly the message one recipient of a section's digest would get now: the same template the
// send uses. Instructors preview any section; a TA only their own (another section is 404).
export default defineEventHandler(async (event): Promise<DigestPreview> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  return digestPreview(scope, readQueryAs(event, digestPreviewQuerySchema))
})
