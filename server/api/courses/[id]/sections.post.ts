import { idParamsSchema } from '#shared/types/fields'
import { sectionInputSchema } from '#shared/types/section'
import { createSection } from '~~/server/services/sections'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, sectionInputSchema)
  const saved = await createSection(useDb(), actorOf(event), course, input)
  setResponseStatus(event, 201)
  return saved
})
