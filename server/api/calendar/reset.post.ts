import { calendarFeedUrl, resetCalendarToken } from '~~/server/services/sections'
// A new secret for the feed URL: calendars subscribed with the old one get 410 Gone from now on.
export default defineEventHandler(async (event): Promise<{ url: string }> => {
  const me = requireUser(event)
  const token = await useDb().transaction().execute(async (trx) => {
    const fresh = await resetCalendarToken(trx, me.id)
    // The token itself stays out of the audit log: the log is not a place to keep secrets.
    await audit(trx, event, { action: 'calendar.reset', entity: 'calendar_feed', entityId: me.id })
    return fresh
  })
  return { url: calendarFeedUrl(token) }
})
