import { idParamsSchema } from '#shared/types/fields'
import { courseInputSchema } from '#shared/types/course'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseInputSchema)
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('courses').set({ ...input, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, {
      action: 'course.update', entity: 'course', entityId: id,
      before: { code: course.code, title: course.title, term: course.term, timezone: course.timezone }, after: input,
    })
  })
  setResponseStatus(event, 204)
  return null
})
