import { idParamsSchema } from '#shared/types/fields'
import { requireEnrollmentAccess } from '~~/server/services/roster'
// Withdrawn, not deleted: the enrolment stays for the record, without a station.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { enrollment: e } = await requireEnrollmentAccess(event, id, 'manage')
  if (e.status !== 'active') throw createError({ statusCode: 409, statusMessage: 'This student has already withdrawn' })

  const withdrawnAt = new Date()
  await useDb().transaction().execute(async (trx) => {
    const changed = await trx.updateTable('enrollments').set({ status: 'withdrawn', withdrawnAt, station: null, seat: null })
      .where('id', '=', e.id).where('status', '=', 'active').executeTakeFirst()
    if (!changed.numUpdatedRows) throw createError({ statusCode: 409, statusMessage: 'This student has already withdrawn' })
    await audit(trx, event, {
      action: 'enrollment.withdraw', entity: 'enrollment', entityId: e.id,
      before: { status: e.status, sectionId: e.sectionId, station: e.station, seat: e.seat },
      after: { status: 'withdrawn', withdrawnAt: withdrawnAt.toISOString(), station: null, seat: null },
    })
  })
  return { id: e.id, status: 'withdrawn' as const, withdrawnAt: withdrawnAt.toISOString() }
})
