// Sections and the schedule: meetings, conflicts across courses, the calendar feed. Routes import from here.

export { calendarFeed, calendarFeedUrl, calendarOwner, calendarToken, resetCalendarFeed } from './calendar-feed'
export { studentLab } from './my-lab'
export { scheduleEntries } from './schedule'
export { createSection, deleteSection, updateSection } from './section-commands'
export { conflictsFor, conflictsOfNewSections, meetingsOf, sectionRows, sectionViews } from './section-rows'
