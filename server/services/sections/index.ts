// Sections and the schedule: meetings, conflicts, the calendar feed. Routes import from here.

export { calendarFeed, calendarFeedUrl, calendarOwner, calendarToken, resetCalendarToken } from './calendar-feed'
export { scheduleEntries } from './schedule'
export { candidateRow, checkTaIds, refuseUnconfirmedConflicts, sectionValues } from './section-input'
export { conflictsFor, meetingsOf, sectionRows, sectionViews } from './section-rows'
