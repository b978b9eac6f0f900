import { idParamsSchema } from '#shared/types/fields'
import { practicalInputSchema, type PracticalDetail } from '#shared/types/practical'
import { createPractical, practicalDetail } from '~~/server/services/practicals'

// A new practical starts with the method's reagents and the substrate at a teaching-lab scale
// (shared/utils/procedure.ts, defaultItems); the instructor then edits the amounts.
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, practicalInputSchema)
  const practicalId = await createPractical(useDb(), actorOf(event), me, id, input)
  setResponseStatus(event, 201)
  return practicalDetail(await requirePracticalAccess(event, practicalId, 'manage'))
})
