import { idParamsSchema } from '#shared/types/fields'
import type { ProcedureCardView } from '#shared/types/practical'
import { procedureCard } from '~~/server/services/practicals'

// The printable procedure card: quantities per work unit, expected products, windows, cautions.
export default defineEventHandler(async (event): Promise<ProcedureCardView> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  return procedureCard(await requirePracticalAccess(event, id))
})
