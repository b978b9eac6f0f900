import { z } from 'zod'
import type { OutboxMessage } from '#shared/types/mail'
import { outboxMessages } from '../../services/outbox'

const querySchema = z.object({
  status: z.enum(['queued', 'sending', 'sent', 'retrying', 'failed']).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(200),
})

export default defineEventHandler(async (event): Promise<OutboxMessage[]> => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const filter = readQueryAs(event, querySchema)
  return outboxMessages(useDb(), me, filter)
})
