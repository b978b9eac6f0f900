import { passwordChangeSchema } from '#shared/types/auth'

export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  const { currentPassword, newPassword } = await readBodyAs(event, passwordChangeSchema)
  if (isCommonPassword(newPassword)) {
    invalid([{ field: 'newPassword', message: 'This password is too common; choose another' }], 422)
  }

  const db = useDb()
  const user = await db.selectFrom('users').select(['email', 'passwordHash']).where('id', '=', me.id).executeTakeFirstOrThrow()
  const attempt = await attemptPassword(event, user.email, { id: me.id, passwordHash: user.passwordHash }, currentPassword)
  if (attempt.outcome === 'throttled') {
    setResponseHeader(event, 'Retry-After', attempt.retryAfterSeconds)
    throw createError({ statusCode: 429, statusMessage: 'Too many wrong passwords. Try again later.' })
  }
  if (attempt.outcome !== 'right') {
    invalid([{ field: 'currentPassword', message: 'Current password is incorrect' }], 422)
  }

  const passwordHash = await hashUserPassword(newPassword)
  const version = await db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable('users')
      .set((eb) => ({ passwordHash, sessionVersion: eb('sessionVersion', '+', 1), updatedAt: new Date() }))
      .where('id', '=', me.id)
      .returning('sessionVersion')
      .executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'password.change', entity: 'user', entityId: me.id })
    return row.sessionVersion
  })
  forgetAccount(me.id)
  // Every other session dies with the old version; this one carries on with the new one.
  await replaceUserSession(event, { user: me, secure: { sv: version }, loggedInAt: Date.now() })
  setResponseStatus(event, 204)
  return null
})
