import { sql } from 'kysely'
import type { PracticalScope } from '../../utils/access'
import type { DigestDelivery, DigestHistoryItem, DigestMessageStatus } from '#shared/types/results'
import { useDb } from '../../utils/db'

function digestDelivery(messages: DigestMessageStatus[], scheduledAt: Date | null): DigestDelivery {
  const count = (s: DigestMessageStatus['status']) => messages.filter((m) => m.status === s).length
  if (count('failed')) return count('failed') === messages.length ? 'failed' : 'partly-failed'
  if (count('retrying')) return 'retrying'
  if (messages.length && count('sent') === messages.length) return 'sent'
  return scheduledAt && scheduledAt.getTime() > Date.now() && count('queued') === messages.length ? 'scheduled' : 'sending'
}

/** The digests of a practical in the caller's sections, newest first, each with its messages' delivery. */
export async function digestHistory(scope: PracticalScope): Promise<DigestHistoryItem[]> {
  const db = useDb()
  const digests = await db.selectFrom('digests').innerJoin('sections', 'sections.id', 'digests.sectionId')
    .leftJoin('users', 'users.id', 'digests.createdBy')
    .select([
      'digests.id', 'digests.sectionId', 'sections.code', 'digests.createdAt', 'digests.scheduledAt', 'digests.recipientCount',
      'users.name',
    ])
    .where('digests.practicalId', '=', scope.practical.id)
    .where('digests.sectionId', 'in', scope.sessionSectionIds.length ? scope.sessionSectionIds : [-1])
    .orderBy('digests.createdAt', 'desc').orderBy('digests.id', 'desc').limit(200).execute()
  if (!digests.length) return []
  const messages = await db.selectFrom('mailMessages')
    .select(['id', 'dedupeKey', 'kind', 'toAddresses', 'status', 'attempts', 'lastError', 'scheduledAt', 'sentAt'])
    .where('dedupeKey', 'like', 'digest:%')
    .where(sql<string>`split_part(dedupe_key, ':', 2)`, 'in', digests.map((d) => String(d.id)))
    .orderBy('id').execute()
  return digests.map((d) => {
    const mine: DigestMessageStatus[] = messages.filter((m) => m.dedupeKey.startsWith(`digest:${d.id}:`)).map((m) => ({
      messageId: m.id, userId: Number(m.dedupeKey.split(':')[2]), to: m.toAddresses, kind: m.kind, status: m.status, attempts: m.attempts,
      lastError: m.lastError, scheduledAt: m.scheduledAt?.toISOString() ?? null, sentAt: m.sentAt?.toISOString() ?? null,
    }))
    const count = (...s: DigestMessageStatus['status'][]) => mine.filter((m) => s.includes(m.status)).length
    return {
      id: d.id, sectionId: d.sectionId, sectionCode: d.code, createdAt: d.createdAt.toISOString(), createdBy: d.name,
      scheduledAt: d.scheduledAt?.toISOString() ?? null, recipientCount: d.recipientCount,
      delivery: digestDelivery(mine, d.scheduledAt),
      counts: { sent: count('sent'), waiting: count('queued', 'sending'), retrying: count('retrying'), failed: count('failed') },
      messages: mine,
    }
  })
}
