import { loginInputSchema, type PublicUser } from '#shared/types/auth'

const BAD_CREDENTIALS = 'E-mail or password is incorrect'

export default defineEventHandler(async (event): Promise<{ user: PublicUser }> => {
  const { email, password } = await readBodyAs(event, loginInputSchema)
  const ip = clientAddress(event)

  const throttled = await checkLoginThrottle(email, ip)
  if (throttled) {
    setResponseHeader(event, 'Retry-After', throttled.retryAfterSeconds)
    const minutes = Math.ceil(throttled.retryAfterSeconds / 60)
    throw createError({ statusCode: 429, statusMessage: `Too many sign-in attempts. Try again in ${minutes} min.` })
  }

  const user = await useDb().selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst()
  // Always run one scrypt, even for unknown e-mail, so timing does not reveal accounts.
  const ok = await verifyUserPassword(user?.passwordHash ?? await dummyPasswordHash(), password)
  const valid = Boolean(user?.passwordHash) && ok
  await recordLoginAttempt(email, ip, valid)
  if (!user || !valid) throw createError({ statusCode: 401, statusMessage: BAD_CREDENTIALS })
  // Only said after the right password, so it reveals nothing to a guesser.
  if (user.disabledAt) {
    throw createError({ statusCode: 401, statusMessage: 'This account is disabled. Ask your course instructor.' })
  }

  await replaceUserSession(event, {
    user: { id: user.id, name: user.name, role: user.role },
    secure: { sv: user.sessionVersion },
    loggedInAt: Date.now(),
  })
  return { user: { id: user.id, email: user.email, name: user.name, role: user.role } }
})
