import type { Kysely } from 'kysely'
import { createError } from 'h3'
import type { Database, MailStatus } from '../../database/schema'
import type { SessionUser } from '#shared/types/auth'
import type { OutboxMessage } from '#shared/types/mail'
import { escapeHtml } from '../../utils/html'
import { queueMail, requeueMail } from '../../utils/mail'
import { mailVisibleTo } from './scope'

// The outbox: the messages a staff member may see, sending one again, and a test message.

export async function outboxMessages(
  db: Kysely<Database>, me: SessionUser, filter: { status?: MailStatus, limit: number },
): Promise<OutboxMessage[]> {
  let query = db
    .selectFrom('mailMessages')
    .select([
      'id', 'kind', 'toAddresses', 'subject', 'status', 'attempts', 'unknownOutcomes', 'lastError', 'scheduledAt', 'sentAt', 'createdAt',
    ])
    .where(mailVisibleTo(me))
    .orderBy('createdAt', 'desc')
    .limit(filter.limit)
  if (filter.status) query = query.where('status', '=', filter.status)
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
}

/** A message of one's own that gave up goes back in the queue with fresh attempts. */
export async function retryMessage(db: Kysely<Database>, me: SessionUser, id: number) {
  const row = await db.selectFrom('mailMessages').select(['id', 'status'])
    .where('id', '=', id).where('createdBy', '=', me.id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Message not found' })
  if (row.status !== 'failed') throw createError({ statusCode: 409, statusMessage: 'Only a message that gave up can be retried' })
  await requeueMail(id)
  return { id, status: 'queued' as const }
}

/** Checks the mail settings end to end: a message to oneself through the queue, once per key. */
export async function queueTestMessage(db: Kysely<Database>, me: SessionUser, key: string) {
  const { email } = await db.selectFrom('users').select('email').where('id', '=', me.id).executeTakeFirstOrThrow()
  return db.transaction().execute((trx) => queueMail(trx, {
    key: `test:${me.id}:${key}`,
    kind: 'test',
    to: [email],
    subject: 'Halocline test message',
    text: `Hello ${me.name},\n\nThis is a test message from Halocline. If you can read it, e-mail delivery works.\n`,
    html: `<p>Hello ${escapeHtml(me.name)},</p><p>This is a test message from Halocline. If you can read it, e-mail delivery works.</p>`,
    createdBy: me.id,
  }))
}
