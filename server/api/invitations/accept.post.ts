import { invitationAcceptSchema } from '#shared/types/roster'
import type { PublicUser } from '#shared/types/auth'
import { findInvitation, invitationGone } from '~~/server/services/roster'

// Public: the link's token and a new password. The invitation is spent atomically (a second
// use, even at the same moment, gets 410), the person's other open links die with it, and
// they are signed in.
export default defineEventHandler(async (event): Promise<{ user: PublicUser }> => {
  const { token, password } = await readBodyAs(event, invitationAcceptSchema)
  if (isCommonPassword(password)) invalid([{ field: 'password', message: 'This password is too common; choose another' }], 422)
  const found = await findInvitation(useDb(), token)
  if (found.status !== 'open') invitationGone(found.status)
  if (found.disabled) throw createError({ statusCode: 403, statusMessage: 'This account is disabled. Ask your course instructor.' })

  const passwordHash = await hashUserPassword(password)
  const user = await useDb().transaction().execute(async (trx) => {
    const now = new Date()
    const spent = await trx.updateTable('invitations').set({ usedAt: now })
      .where('id', '=', found.invitationId).where('usedAt', 'is', null).where('expiresAt', '>', now)
      .returning('userId').executeTakeFirst()
    if (!spent) invitationGone((await findInvitation(trx, token)).status as 'used' | 'expired')
    await trx.updateTable('invitations').set({ expiresAt: now })
      .where('userId', '=', found.userId).where('usedAt', 'is', null).where('expiresAt', '>', now).execute()
    const row = await trx.updateTable('users').set({ passwordHash, updatedAt: now }).where('id', '=', found.userId)
      .returning(['id', 'email', 'name', 'role', 'sessionVersion']).executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'invitation.accept', entity: 'user', entityId: row.id, after: { invitationId: found.invitationId } })
    return row
  })
  await replaceUserSession(event, {
    user: { id: user.id, name: user.name, role: user.role },
    secure: { sv: user.sessionVersion },
    loggedInAt: Date.now(),
  })
  return { user: { id: user.id, email: user.email, name: user.name, role: user.role } }
})
