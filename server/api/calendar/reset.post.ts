import { calendarFeedUrl, resetCalendarFeed } from '~~/server/services/sections'

// A new secret for the feed URL: calendars subscribed with the old one get 410 Gone from now on.
export default defineEventHandler(async (event): Promise<{ url: string }> => {
  const me = requireUser(event)
  const config = useRuntimeConfig(event)
  const token = await resetCalendarFeed(useDb(), actorOf(event), me.id, config.session.password as string)
  return { url: calendarFeedUrl(token, config.public.appUrl) }
})
