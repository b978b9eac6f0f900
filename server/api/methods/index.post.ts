import { methodInputSchema, type MethodView } from '#shared/types/library'
import { newMethodRow, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, methodInputSchema)
  const row = await useDb().transaction().execute(async (trx) => {
    const created = await trx.insertInto('methods').values(newMethodRow(input, me.id)).returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'method.create', entity: 'method', entityId: created.id, after: input })
    return created
  })
  setResponseStatus(event, 201)
  return toMethodView(row, me, 0)
})
