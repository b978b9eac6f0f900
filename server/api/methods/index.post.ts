import { methodInputSchema, type MethodView } from '#shared/types/library'
import { createMethod, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, methodInputSchema)
  const row = await createMethod(useDb(), actorOf(event), me.id, input)
  setResponseStatus(event, 201)
  return toMethodView(row, me, 0)
})
