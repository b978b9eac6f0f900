import { z } from 'zod'
import { invitationTokenSchema, type InvitationView } from '#shared/types/roster'
import { findInvitation, invitationGone } from '~~/server/services/roster'

const paramsSchema = z.object({ token: z.string() })

// Public: the invitation page asks who a link is for before the person chooses a password.
export default defineEventHandler(async (event): Promise<InvitationView> => {
  // Answers about a secret link are never kept by a cache, whatever they say.
  setResponseHeader(event, 'Cache-Control', 'no-store')
  const { token } = readParamsAs(event, paramsSchema)
  if (!invitationTokenSchema.safeParse(token).success) invitationGone('missing')
  const found = await findInvitation(useDb(), token)
  if (found.status !== 'open') invitationGone(found.status)
  return {
    name: found.name,
    email: found.email,
    expiresAt: found.expiresAt.toISOString(),
    signIn: passwordSignInOpenTo(found.email) ? 'password' : 'campus',
    campusLabel: campusSettings()?.buttonLabel ?? null,
  }
})
