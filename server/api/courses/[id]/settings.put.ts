import { idParamsSchema } from '#shared/types/fields'
import { courseSettingsSchema } from '#shared/types/course'
import { updateCourseSettings } from '~~/server/services/courses'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, courseSettingsSchema)
  await updateCourseSettings(useDb(), actorOf(event), course, input)
  setResponseStatus(event, 204)
  return null
})
