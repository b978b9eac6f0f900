// Rosters: enrolments, stations and seats, roster files, invitations. Routes import from here.

export { findInvitation, invitationGone } from './invitations'
export { inviteToCourse, planRosterImport, refuseOverCapacity, rosterPreviewRows, withRosterRace, writeRosterRows } from './roster-import'
export { loadSectionRoster, partnerNames, requireEnrollmentAccess, rosterActiveCount, rosterActiveStudents, rosterCapacityFor, rosterPlaceStudent, rosterStationPlaces, stationMates } from './section-roster'
