import type { PracticalScope } from '../../utils/access'
import type { DigestPreview, DigestRecipient } from '#shared/types/results'
import { createError } from 'h3'
import { loadDigestContext, type DigestContext } from './data'
import { composeDigestMessage } from './templates'

/** The recipient a preview is for: the one asked for, else the caller when they get it, else the first. */
export function digestRecipientFor(
  ctx: DigestContext, audience: DigestRecipient['audience'], userId: number | undefined, callerId: number,
): DigestRecipient {
  const candidates = ctx.recipients.filter((r) => r.audience === audience)
  const chosen = userId !== undefined
    ? candidates.find((r) => r.userId === userId)
    : candidates.find((r) => r.userId === callerId) ?? candidates[0]
  if (!chosen) throw createError({ statusCode: 404, statusMessage: 'Recipient not found' })
  return chosen
}

/** Exactly the message one recipient of a section's digest would get now: the template the send uses. */
export async function digestPreview(
  scope: PracticalScope, query: { sectionId: number, audience: DigestRecipient['audience'], userId?: number },
): Promise<DigestPreview> {
  const ctx = await loadDigestContext(scope, query.sectionId)
  const recipient = digestRecipientFor(ctx, query.audience, query.userId, scope.me.id)
  return {
    ...composeDigestMessage(ctx, recipient), recipient, recipients: ctx.recipients,
    pendingReview: ctx.pendingReview, countedRuns: ctx.countedRuns,
  }
}
