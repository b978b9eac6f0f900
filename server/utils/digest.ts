import type { H3Event } from 'h3'
import { sql } from 'kysely'
import type { PracticalScope } from './access'
import type { DigestContext } from './digest-data'
import type { DigestDelivery, DigestHistoryItem, DigestMessageStatus, DigestRecipient, DigestSent } from '#shared/types/results'

/** The recipient a preview is for: the one asked for, else the caller when they get it, else the first. */
export function digestRecipientFor(ctx: DigestContext, audience: DigestRecipient['audience'], userId: number | undefined, callerId: number): DigestRecipient {
  const candidates = ctx.recipients.filter((r) => r.audience === audience)
  const chosen = userId !== undefined
    ? candidates.find((r) => r.userId === userId)
    : candidates.find((r) => r.userId === callerId) ?? candidates[0]
  if (!chosen) throw createError({ statusCode: 404, statusMessage: 'Recipient not found' })
  return chosen
}

/**
 * One digest per section, its messages queued in the same transaction (keys
 * 'digest:<digest id>:<user id>'). The same Idempotency-Key from the same sender gives back the
 * digests it made the first time and queues nothing; without a key every call is a new send.
 */
export async function sendDigests(event: H3Event, scope: PracticalScope, sectionIds: number[], sendAt: Date | null, requestKey: string | null): Promise<DigestSent> {
  const unique = [...new Set(sectionIds)]
  const contexts: DigestContext[] = []
  for (const id of unique) contexts.push(await loadDigestContext(scope, id))
  const scheduled = sendAt && sendAt.getTime() > Date.now() ? sendAt : null
  let created = false
  const digests = await useDb().transaction().execute(async (trx) => {
    const out: DigestSent['digests'] = []
    for (const ctx of contexts) {
      const row = await trx.insertInto('digests').values({
        practicalId: scope.practical.id, sectionId: ctx.section.id, requestKey, scheduledAt: scheduled,
        status: scheduled ? 'scheduled' : 'queued', recipientCount: ctx.recipients.length, createdBy: scope.me.id,
      }).onConflict((oc) => oc.columns(['createdBy', 'requestKey', 'sectionId']).where('requestKey', 'is not', null).doNothing())
        .returning(['id', 'scheduledAt', 'recipientCount']).executeTakeFirst()
      if (!row) {
        const existing = await trx.selectFrom('digests').select(['id', 'scheduledAt', 'recipientCount'])
          .where('createdBy', '=', scope.me.id).where('requestKey', '=', requestKey).where('sectionId', '=', ctx.section.id).executeTakeFirstOrThrow()
        out.push({ id: existing.id, sectionId: ctx.section.id, sectionCode: ctx.section.code, scheduledAt: existing.scheduledAt?.toISOString() ?? null, recipientCount: existing.recipientCount })
        continue
      }
      created = true
      for (const recipient of ctx.recipients) {
        const message = composeDigestMessage(ctx, recipient)
        await queueMail(trx, {
          key: `digest:${row.id}:${recipient.userId}`,
          kind: `digest-${recipient.audience}`,
          to: [message.to], subject: message.subject, text: message.text, html: message.html, attachments: message.attachments,
          createdBy: scope.me.id, courseId: scope.course.id, sendAt: scheduled ?? undefined,
        })
      }
      await audit(trx, event, {
        action: 'digest.send', entity: 'digest', entityId: row.id,
        after: { practicalId: scope.practical.id, sectionId: ctx.section.id, recipients: ctx.recipients.length, scheduledAt: scheduled?.toISOString() ?? null },
      })
      out.push({ id: row.id, sectionId: ctx.section.id, sectionCode: ctx.section.code, scheduledAt: row.scheduledAt?.toISOString() ?? null, recipientCount: row.recipientCount })
    }
    return out
  })
  return { created, digests }
}

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
    .select(['digests.id', 'digests.sectionId', 'sections.code', 'digests.createdAt', 'digests.scheduledAt', 'digests.recipientCount', 'users.name'])
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
