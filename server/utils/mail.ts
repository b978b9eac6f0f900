import { createHash } from 'node:crypto'
import nodemailer, { type Transporter } from 'nodemailer'
import type { Kysely, Transaction } from 'kysely'
import type { Database, MailAttachment } from '../database/schema'

export interface OutgoingMail {
  /** Same key, same message: queueing it again changes nothing. */
  key: string
  kind: string
  to: string[]
  subject: string
  text: string
  html?: string
  attachments?: MailAttachment[]
  createdBy?: number | null
  /** The course it concerns, so every owner of the course sees it in their outbox. */
  courseId?: number | null
  sendAt?: Date
}

let transporter: Transporter | undefined

function transport(): Transporter {
  const smtp = useRuntimeConfig().smtp
  transporter ??= nodemailer.createTransport({
    host: smtp.host,
    port: Number(smtp.port),
    secure: Boolean(smtp.secure),
    ignoreTLS: Boolean(smtp.ignoreTls),
    auth: smtp.user ? { user: smtp.user, pass: smtp.pass } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  })
  return transporter
}

function retryOptions() {
  const mail = useRuntimeConfig().mail
  return { retryLimit: Number(mail.retryLimit), retryDelay: Number(mail.retryDelaySeconds), retryBackoff: true }
}

/**
 * Records the message and its delivery job in the caller's transaction: both or neither.
 * Returns the row id, and whether this call created it.
 */
export async function queueMail(db: Kysely<Database> | Transaction<Database>, mail: OutgoingMail) {
  const inserted = await db
    .insertInto('mailMessages')
    .values({
      dedupeKey: mail.key,
      kind: mail.kind,
      toAddresses: mail.to,
      subject: mail.subject,
      textBody: mail.text,
      htmlBody: mail.html ?? null,
      attachments: JSON.stringify(mail.attachments ?? []),
      createdBy: mail.createdBy ?? null,
      courseId: mail.courseId ?? null,
      scheduledAt: mail.sendAt ?? null,
    })
    .onConflict((oc) => oc.column('dedupeKey').doNothing())
    .returning('id')
    .executeTakeFirst()
  if (!inserted) {
    const existing = await db.selectFrom('mailMessages').select('id').where('dedupeKey', '=', mail.key).executeTakeFirstOrThrow()
    return { id: existing.id, created: false }
  }
  const boss = await useQueue()
  await boss.send(MAIL_QUEUE, { messageId: inserted.id }, {
    ...retryOptions(),
    singletonKey: `mail-${inserted.id}`,
    startAfter: mail.sendAt,
    db: inTransaction(db),
  })
  return { id: inserted.id, created: true }
}

/** Puts a failed message back in the queue with a fresh set of attempts. */
export async function requeueMail(id: number) {
  const db = useDb()
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('mailMessages').set({ status: 'queued', lastError: null, updatedAt: new Date() }).where('id', '=', id).execute()
    const boss = await useQueue()
    await boss.send(MAIL_QUEUE, { messageId: id }, { ...retryOptions(), db: inTransaction(trx) })
  })
}

function messageIdFor(id: number, key: string) {
  const host = new URL(useRuntimeConfig().public.appUrl).hostname || 'halocline.local'
  return `<halocline.${id}.${createHash('sha256').update(key).digest('hex').slice(0, 12)}@${host}>`
}

/** One delivery attempt. Throws on failure so pg-boss schedules the next try with backoff. */
export async function deliverMail(id: number) {
  const db = useDb()
  const row = await db
    .updateTable('mailMessages')
    .set((eb) => ({ status: 'sending', attempts: eb('attempts', '+', 1), updatedAt: new Date() }))
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'retrying', 'sending'])
    .returningAll()
    .executeTakeFirst()
  // Already sent (a duplicate job) or given up: never send twice.
  if (!row) return

  try {
    const info = await transport().sendMail({
      from: useRuntimeConfig().smtp.from,
      to: row.toAddresses,
      subject: row.subject,
      text: row.textBody,
      html: row.htmlBody ?? undefined,
      attachments: row.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, content: a.content, encoding: 'base64' })),
      // Stable per message, so a receiver can drop the rare duplicate after a crash mid-send.
      messageId: messageIdFor(row.id, row.dedupeKey),
    })
    await db.updateTable('mailMessages')
      .set({ status: 'sent', sentAt: new Date(), providerMessageId: info.messageId ?? null, lastError: null, updatedAt: new Date() })
      .where('id', '=', id).execute()
  } catch (error) {
    const exhausted = row.attempts > Number(useRuntimeConfig().mail.retryLimit)
    await db.updateTable('mailMessages')
      .set({ status: exhausted ? 'failed' : 'retrying', lastError: error instanceof Error ? error.message : String(error), updatedAt: new Date() })
      .where('id', '=', id).execute()
    throw error
  }
}
