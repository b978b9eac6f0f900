import { randomUUID } from 'node:crypto'
import { idParamsSchema } from '#shared/types/fields'
import type { InvitationRoundResult } from '#shared/types/roster'
import { resendOpenInvitations } from '~~/server/services/roster'

// A fresh link to everyone of the course who has not set a password, one mail each. The
// Idempotency-Key names the round: the same press sent again mails nobody twice.
export default defineEventHandler(async (event): Promise<InvitationRoundResult> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const roundKey = getRequestHeader(event, 'idempotency-key')?.trim().slice(0, 200) || randomUUID()
  const ctx = { course, me, appUrl: useRuntimeConfig(event).public.appUrl }
  return resendOpenInvitations(useDb(), actorOf(event), ctx, roundKey)
})
