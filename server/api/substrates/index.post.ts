import { substrateInputSchema, type SubstrateDetail } from '#shared/types/library'
import { createSubstrate, substrateDetail, substrateIdentity } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, substrateInputSchema)
  const identity = await substrateIdentity(input.smiles)
  const row = await createSubstrate(useDb(), actorOf(event), me.id, input, identity)
  setResponseStatus(event, 201)
  return substrateDetail(row, me)
})
