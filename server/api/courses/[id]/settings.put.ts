import { idParamsSchema } from '#shared/types/fields'
import { courseSettingsSchema } from '#shared/types/course'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseSettingsSchema)
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('courses').set({ ...input, rubric: JSON.stringify(input.rubric), updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, {
      action: 'course.settings', entity: 'course', entityId: id,
      before: {
        outlierTest: course.outlierTest, outlierAlpha: course.outlierAlpha, zscoreLimit: course.zscoreLimit,
        accuracyTolerancePercent: course.accuracyTolerancePercent, releasePolicy: course.releasePolicy, rubric: course.rubric,
      },
      after: input,
    })
  })
  setResponseStatus(event, 204)
  return null
})
