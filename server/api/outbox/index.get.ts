import { z } from 'zod'
import type { OutboxMessage } from '#shared/types/mail'

const querySchema = z.object({
  status: z.enum(['queued', 'sending', 'sent', 'retrying', 'failed']).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(200),
})

export default defineEventHandler(async (event): Promise<OutboxMessage[]> => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { status, limit } = readQueryAs(event, querySchema)
  let query = useDb()
    .selectFrom('mailMessages')
    .select(['id', 'kind', 'toAddresses', 'subject', 'status', 'attempts', 'unknownOutcomes', 'lastError', 'scheduledAt', 'sentAt', 'createdAt'])
    .where(mailVisibleTo(me))
    .orderBy('createdAt', 'desc')
    .limit(limit)
  if (status) query = query.where('status', '=', status)
  const rows = await query.execute()
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind,
    to: r.toAddresses,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    unknownOutcomes: r.unknownOutcomes,
    lastError: r.lastError,
    scheduledAt: r.scheduledAt?.toISOString() ?? null,
    sentAt: r.sentAt?.toISOString() ?? null,
    createdAt: r.createdAt.toISOString(),
  }))
})
