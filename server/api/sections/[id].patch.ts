import { idParamsSchema } from '#shared/types/fields'
import { sectionInputSchema } from '#shared/types/section'
import { updateSection } from '~~/server/services/sections'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireSectionAccess(event, id, 'manage')
  const input = await readBodyAs(event, sectionInputSchema)
  return updateSection(useDb(), actorOf(event), course, id, input)
})
