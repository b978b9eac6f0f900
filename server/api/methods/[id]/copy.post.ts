import { idParamsSchema } from '#shared/types/fields'
import { type MethodView } from '#shared/types/library'
import { copyName, requireLibraryEntry, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row: original } = await requireLibraryEntry(event, 'methods', id, 'read')
  const row = await useDb().transaction().execute(async (trx) => {
    const { id: _id, createdAt: _c, updatedAt: _u, ...fields } = original
    const copy = await trx.insertInto('methods').values({ ...fields, name: copyName(original.name), ownerId: me.id })
      .returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'method.copy', entity: 'method', entityId: copy.id, after: { copiedFrom: id, name: copy.name } })
    return copy
  })
  setResponseStatus(event, 201)
  return toMethodView(row, me, 0)
})
