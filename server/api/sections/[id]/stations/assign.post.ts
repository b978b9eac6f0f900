import { idParamsSchema } from '#shared/types/fields'
import { type SectionRosterView } from '#shared/types/roster'
import { loadSectionRoster, rosterActiveStudents, rosterStationPlaces, withRosterRace } from '~~/server/services/roster'

// Everyone active, in name order, onto stations 1, 2, … with seats 1..students per station.
export default defineEventHandler(async (event): Promise<SectionRosterView> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section } = await requireSectionAccess(event, id, 'manage')

  return withRosterRace(() => useDb().transaction().execute(async (trx) => {
    const students = await rosterActiveStudents(trx, section.id)
    const places = rosterStationPlaces(students.length, section)
    if (!places) {
      const seats = section.hoodStations * section.studentsPerStation
      throw createError({ statusCode: 409, statusMessage: `${section.code} has ${students.length} students but ${seats} places at its hood stations` })
    }
    // Lift everyone first: the seat index allows one student per seat at every moment.
    await trx.updateTable('enrollments').set({ station: null, seat: null }).where('sectionId', '=', section.id).where('status', '=', 'active').execute()
    for (const [i, s] of students.entries()) {
      await trx.updateTable('enrollments').set(places[i]!).where('id', '=', s.id).execute()
    }
    await audit(trx, event, {
      action: 'section.stations.assign', entity: 'section', entityId: section.id,
      before: students.map((s) => ({ id: s.id, station: s.station, seat: s.seat })),
      after: students.map((s, i) => ({ id: s.id, ...places[i]! })),
    })
    return loadSectionRoster(trx, section)
  }), 'The roster changed meanwhile. Try again.')
})
