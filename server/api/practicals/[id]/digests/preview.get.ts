import { idParamsSchema } from '#shared/types/fields'
import { digestPreviewQuerySchema, type DigestPreview } from '#shared/types/results'

// Exactly the message one recipient of a section's digest would get now: the same template the
// send uses. Instructors preview any section; a TA only their own (another section is 404).
export default defineEventHandler(async (event): Promise<DigestPreview> => {
  const me = requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  const query = readQueryAs(event, digestPreviewQuerySchema)
  const ctx = await loadDigestContext(scope, query.sectionId)
  const recipient = digestRecipientFor(ctx, query.audience, query.userId, me.id)
  return { ...composeDigestMessage(ctx, recipient), recipient, recipients: ctx.recipients }
})
