import { calendarFeedUrl, calendarToken } from '~~/server/services/sections'

// The caller's calendar feed URL; the secret token is made on the first call.
export default defineEventHandler(async (event): Promise<{ url: string }> => {
  const me = requireUser(event)
  const config = useRuntimeConfig(event)
  const token = await calendarToken(useDb(), me.id, config.session.password as string)
  return { url: calendarFeedUrl(token, config.public.appUrl) }
})
