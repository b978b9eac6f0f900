export default defineEventHandler(async (event) => {
  const user = event.context.auth?.user
  // The version bump is what makes the old cookie worthless, wherever a copy of it lives.
  if (user) await revokeSessions(user.id)
  await clearUserSession(event)
  setResponseStatus(event, 204)
  return null
})
