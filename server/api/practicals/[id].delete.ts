import { practicalParamsSchema } from '#shared/types/practical'

// Deleting takes its sessions and scale with it (ON DELETE CASCADE). Once results exist it must
// be refused: released results are the sign of that today; the submissions issue adds its own
// check here (any submission row → 409).
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, practicalParamsSchema)
  const { practical } = await requirePracticalAccess(event, id, 'manage')
  if (practical.resultsReleasedAt) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has released results; it can no longer be deleted' })
  }
  await useDb().transaction().execute(async (trx) => {
    const sessions = await trx.selectFrom('practicalSessions').selectAll().where('practicalId', '=', id).execute()
    const items = await trx.selectFrom('practicalItems').selectAll().where('practicalId', '=', id).orderBy('position').execute()
    await trx.deleteFrom('practicals').where('id', '=', id).execute()
    await audit(trx, event, { action: 'practical.delete', entity: 'practical', entityId: id, before: { ...practical, sessions, items } })
  })
  setResponseStatus(event, 204)
  return null
})
