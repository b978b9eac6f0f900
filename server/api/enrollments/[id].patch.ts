import { idParamsSchema } from '#shared/types/fields'
import { enrollmentPatchSchema } from '#shared/types/roster'
import { refuseOverCapacity, requireEnrollmentAccess, rosterActiveCount, rosterCapacityFor, rosterPlaceStudent, withRosterRace } from '~~/server/services/roster'

// Move a student to another section of the same course, or to a station and seat in theirs
// (swapping with whoever sits there). One transaction, one audit row with before and after.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { enrollment: e, scope } = await requireEnrollmentAccess(event, id, 'manage')
  const input = await readBodyAs(event, enrollmentPatchSchema)
  if (e.status !== 'active') throw createError({ statusCode: 409, statusMessage: 'This student has withdrawn; add them again instead' })

  let target = scope.section
  if (input.sectionId !== undefined && input.sectionId !== e.sectionId) {
    target = (await requireSectionAccess(event, input.sectionId, 'manage')).section
    if (target.courseId !== e.courseId) invalid([{ field: 'sectionId', message: 'Choose a section of the same course' }], 422)
  }
  const station = input.station === undefined ? (target.id === e.sectionId ? e.station : null) : input.station
  const seat = input.seat === undefined ? (target.id === e.sectionId ? e.seat : null) : input.seat
  if (station !== null && station > target.hoodStations) invalid([{ field: 'station', message: `${target.code} has ${target.hoodStations} hood stations` }], 422)
  if (seat !== null && seat > target.studentsPerStation) invalid([{ field: 'seat', message: `${target.code} has ${target.studentsPerStation} seats per station` }], 422)

  return withRosterRace(() => useDb().transaction().execute(async (trx) => {
    let swapped: { swappedWith?: number } = {}
    if (target.id !== e.sectionId) {
      refuseOverCapacity(rosterCapacityFor(target, (await rosterActiveCount(trx, target.id)) + 1), input.confirmConflicts)
      await trx.updateTable('enrollments').set({ sectionId: target.id, station: null, seat: null }).where('id', '=', e.id).execute()
      if (station !== null) swapped = await rosterPlaceStudent(trx, { ...e, sectionId: target.id, station: null, seat: null }, station, seat)
    } else {
      swapped = await rosterPlaceStudent(trx, e, station, seat)
    }
    const after = { sectionId: target.id, station, seat, ...swapped }
    await audit(trx, event, {
      action: target.id !== e.sectionId ? 'enrollment.move' : 'enrollment.place', entity: 'enrollment', entityId: e.id,
      before: { sectionId: e.sectionId, station: e.station, seat: e.seat }, after,
    })
    return { id: e.id, ...after }
  }), 'Someone changed this roster meanwhile. Reload it and try again.')
})
