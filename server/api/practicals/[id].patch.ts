import { idParamsSchema } from '#shared/types/fields'
import { practicalPatchSchema, type PracticalDetail } from '#shared/types/practical'
import { practicalDetail, updatePractical } from '~~/server/services/practicals'

// Another substrate or method rewrites the scale: see itemsAfterLibraryChange.
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { practical } = await requirePracticalAccess(event, id, 'manage')
  const input = await readBodyAs(event, practicalPatchSchema)
  await updatePractical(useDb(), actorOf(event), me, practical, input)
  return practicalDetail(await requirePracticalAccess(event, id, 'manage'))
})
