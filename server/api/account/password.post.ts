import { passwordChangeSchema } from '#shared/types/auth'

export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  const { currentPassword, newPassword } = await readBodyAs(event, passwordChangeSchema)
  if (isCommonPassword(newPassword)) {
    invalid([{ field: 'newPassword', message: 'This password is too common; choose another' }], 422)
  }

  const db = useDb()
  const user = await db.selectFrom('users').select(['email', 'passwordHash']).where('id', '=', me.id).executeTakeFirstOrThrow()
  const ip = clientAddress(event)
  const throttled = await checkLoginThrottle(user.email, ip)
  if (throttled) {
    setResponseHeader(event, 'Retry-After', throttled.retryAfterSeconds)
    throw createError({ statusCode: 429, statusMessage: 'Too many wrong passwords. Try again later.' })
  }
  if (!user.passwordHash || !(await verifyUserPassword(user.passwordHash, currentPassword))) {
    await recordLoginAttempt(user.email, ip, false)
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
