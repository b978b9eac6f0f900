import { idParamsSchema } from '#shared/types/fields'
import { halogenMismatch, methodPatchSchema, type MethodView } from '#shared/types/library'
import { libraryUsage, requireLibraryEntry, toMethodView, updateMethod } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row: before } = await requireLibraryEntry(event, 'methods', id, 'edit')
  const patch = await readBodyAs(event, methodPatchSchema)
  const mismatch = halogenMismatch(patch.reagent ?? before.reagent, patch.halogen)
  if (mismatch) invalid([{ field: 'halogen', message: mismatch }])
  const row = await updateMethod(useDb(), actorOf(event), before, patch)
  const usage = await libraryUsage('methods', [id])
  return toMethodView(row, me, usage.get(id) ?? 0)
})
