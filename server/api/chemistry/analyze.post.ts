import { analyzeInputSchema, type AnalyzeResponse } from '#shared/types/chemistry'

// The analysis, prediction and drawings are computed in the engine worker (server/engines/chemistry.ts).
export default defineEventHandler(async (event): Promise<AnalyzeResponse> => {
  requireUser(event)
  const input = await readBodyAs(event, analyzeInputSchema)
  return asBadRequest(() => runEngine('analyzeRequest', input, { field: 'smiles' }))
})
