import { idParamsSchema } from '#shared/types/fields'
// Deleting takes its sessions and scale with it (ON DELETE CASCADE). Once results exist it must
// be refused: released results, or any submission at all (uploads are never lost).
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { practical } = await requirePracticalAccess(event, id, 'manage')
  if (practical.resultsReleasedAt) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has released results; it can no longer be deleted' })
  }
  const inUse = () => createError({ statusCode: 409, statusMessage: 'Students have uploaded results to this practical; it can no longer be deleted' })
  const submitted = await useDb().selectFrom('submissions').select('id').where('practicalId', '=', id).limit(1).executeTakeFirst()
  if (submitted) throw inUse()
  await useDb().transaction().execute(async (trx) => {
    const sessions = await trx.selectFrom('practicalSessions').selectAll().where('practicalId', '=', id).execute()
    const items = await trx.selectFrom('practicalItems').selectAll().where('practicalId', '=', id).orderBy('position').execute()
    await trx.deleteFrom('practicals').where('id', '=', id).execute()
    await audit(trx, event, { action: 'practical.delete', entity: 'practical', entityId: id, before: { ...practical, sessions, items } })
  }).catch((error) => {
    // An upload that landed after the check: the foreign key refuses the delete.
    if ((error as { code?: string }).code === '23503') throw inUse()
    throw error
  })
  setResponseStatus(event, 204)
  return null
})
