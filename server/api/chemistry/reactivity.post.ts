import { reactivityInputSchema, type ReactivityResponse } from '#shared/types/chemistry'

// Matching the observed products and the reactivities are computed in the engine worker (server/engines/chemistry.ts).
export default defineEventHandler(async (event): Promise<ReactivityResponse> => {
  requireUser(event)
  const input = await readBodyAs(event, reactivityInputSchema)
  return asBadRequest(() => runEngine('reactivityRequest', input, { field: 'smiles' }))
})
