import { idParamsSchema } from '#shared/types/fields'
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section } = await requireSectionAccess(event, id, 'manage')
  const db = useDb()
  const students = await db.selectFrom('enrollments').select('id').where('sectionId', '=', id).limit(1).execute()
  const sessions = await db.selectFrom('practicalSessions').select('id').where('sectionId', '=', id).limit(1).execute()
  // History (enrolments, practicals) hangs off a section: only an empty one may go.
  if (students.length || sessions.length) {
    throw createError({ statusCode: 409, statusMessage: 'This section has students or practicals; move them first' })
  }
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('sections').where('id', '=', id).execute()
    await audit(trx, event, { action: 'section.delete', entity: 'section', entityId: id, before: section })
  })
  setResponseStatus(event, 204)
  return null
})
