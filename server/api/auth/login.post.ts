import { loginInputSchema, type PublicUser } from '#shared/types/auth'

const BAD_CREDENTIALS = 'E-mail or password is incorrect'

export default defineEventHandler(async (event): Promise<{ user: PublicUser }> => {
  const { email, password } = await readBodyAs(event, loginInputSchema)
  // Says nothing about the account: only whether this installation lets this e-mail use a password.
  if (!passwordSignInOpenTo(email)) {
    throw createError({ statusCode: 403, statusMessage: 'Password sign-in is turned off here. Use the campus sign-in.' })
  }
  const user = await useDb().selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst()

  const attempt = await attemptPassword(event, email, user, password)
  if (attempt.outcome === 'throttled') {
    setResponseHeader(event, 'Retry-After', attempt.retryAfterSeconds)
    const minutes = Math.ceil(attempt.retryAfterSeconds / 60)
    throw createError({ statusCode: 429, statusMessage: `Too many sign-in attempts. Try again in ${minutes} min.` })
  }
  if (!user || attempt.outcome !== 'right') throw createError({ statusCode: 401, statusMessage: BAD_CREDENTIALS })
  // Only said after the right password, so it reveals nothing to a guesser.
  if (user.disabledAt) {
    throw createError({ statusCode: 401, statusMessage: 'This account is disabled. Ask your course instructor.' })
  }

  await replaceUserSession(event, {
    user: { id: user.id, name: user.name, role: user.role },
    secure: { sv: user.sessionVersion },
    loggedInAt: Date.now(),
    via: 'password',
  })
  await audit(useDb(), { id: user.id, ip: clientAddress(event) }, { action: 'sign-in.password', entity: 'user', entityId: user.id })
  return { user: { id: user.id, email: user.email, name: user.name, role: user.role } }
})
