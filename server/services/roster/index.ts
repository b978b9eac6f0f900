// Rosters: enrolments, hood stations and seats, roster files, invitations. Routes import from here.

export { acceptInvitation, joinThroughCampus, resendInvitation } from './invitation-commands'
export { findInvitation, invitationGone } from './invitations'
export { inviteTa, openInvitationsOf, resendOpenInvitations } from './course-invitations'
export { confirmedIdChanges, planRosterImport, rosterImportHistory, rosterPreviewRows, skippedRowsCsv } from './roster-import'
export { addEnrollment, assignStations, importRoster, placeEnrollment, refuseWithdrawn, withdrawEnrollment } from './roster-commands'
export { loadSectionRoster, partnerNames, requireEnrollmentAccess, stationMates } from './section-roster'
