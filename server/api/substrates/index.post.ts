import { substrateInputSchema, type SubstrateDetail } from '#shared/types/library'
import { substrateDetail, substrateIdentity } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, substrateInputSchema)
  const identity = await substrateIdentity(input.smiles)
  const row = await useDb().transaction().execute(async (trx) => {
    const created = await trx.insertInto('substrates')
      .values({ ...input, ...identity, ownerId: me.id })
      .returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'substrate.create', entity: 'substrate', entityId: created.id, after: { ...input, ...identity } })
    return created
  })
  setResponseStatus(event, 201)
  return substrateDetail(row, me)
})
