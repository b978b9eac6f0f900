import { invitationAcceptSchema } from '#shared/types/roster'
import type { PublicUser } from '#shared/types/auth'
import { acceptInvitation, findInvitation, invitationGone } from '~~/server/services/roster'

// Public: the link's token and a new password. The invitation is spent atomically (a second
// use, even at the same moment, gets 410), the person's other open links die with it, and
// they are signed in. Where password sign-in is off for the person, the campus sign-in spends
// the invitation instead (services/campus-sign-in/flow.ts).
export default defineEventHandler(async (event): Promise<{ user: PublicUser }> => {
  const { token, password } = await readBodyAs(event, invitationAcceptSchema)
  if (isCommonPassword(password)) invalid([{ field: 'password', message: 'This password is too common; choose another' }], 422)
  const found = await findInvitation(useDb(), token)
  if (found.status !== 'open') invitationGone(found.status)
  if (found.disabled) throw createError({ statusCode: 403, statusMessage: 'This account is disabled. Ask your course instructor.' })
  // A password nobody may sign in with would only mislead: the campus sign-in accepts instead.
  if (!passwordSignInOpenTo(found.email)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Password sign-in is turned off here. Accept the invitation with the campus sign-in.',
    })
  }

  const passwordHash = await hashUserPassword(password)
  const user = await acceptInvitation(useDb(), auditActorOf(event), token, found, passwordHash)
  await replaceUserSession(event, {
    user: { id: user.id, name: user.name, role: user.role },
    secure: { sv: user.sessionVersion },
    loggedInAt: Date.now(),
  })
  return { user: { id: user.id, email: user.email, name: user.name, role: user.role } }
})
