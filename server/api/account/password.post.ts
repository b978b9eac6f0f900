import { passwordChangeSchema } from '#shared/types/auth'
import { changePassword, refuseCommonPassword } from '../../services/accounts'

export default defineEventHandler(async (event) => {
  const actor = actorOf(event)
  const { currentPassword, newPassword } = await readBodyAs(event, passwordChangeSchema)
  refuseCommonPassword(newPassword)

  const db = useDb()
  const stored = await db.selectFrom('users').select(['email', 'passwordHash']).where('id', '=', actor.id).executeTakeFirstOrThrow()
  const attempt = await attemptPassword(event, stored.email, { id: actor.id, passwordHash: stored.passwordHash }, currentPassword)
  if (attempt.outcome === 'throttled') {
    setResponseHeader(event, 'Retry-After', attempt.retryAfterSeconds)
    throw createError({ statusCode: 429, statusMessage: 'Too many wrong passwords. Try again later.' })
  }
  if (attempt.outcome !== 'right') {
    invalid([{ field: 'currentPassword', message: 'Current password is incorrect' }], 422)
  }

  const version = await changePassword(db, actor, await hashUserPassword(newPassword))
  await announceAccountChange(db, actor.id)
  // Every other session dies with the old version; this one carries on with the new one.
  const { ip: _ip, ...user } = actor
  await replaceUserSession(event, { user, secure: { sv: version }, loggedInAt: Date.now() })
  setResponseStatus(event, 204)
  return null
})
