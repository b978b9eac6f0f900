import { calendarFeedUrl, calendarToken } from '~~/server/services/sections'
// The caller's calendar feed URL; the secret token is made on the first call.
export default defineEventHandler(async (event): Promise<{ url: string }> => {
  const me = requireUser(event)
  return { url: calendarFeedUrl(await calendarToken(me.id)) }
})
