import { createHash } from 'node:crypto'
import nodemailer, { type Transporter } from 'nodemailer'
import type { Kysely, Transaction } from 'kysely'
import type { Database, MailAttachment } from '../database/schema'

export interface OutgoingMail {
  /** Same key, same message: queueing it again changes nothing. */
  key: string
  kind: string
  to: string[]
  /** Where an answer goes, and a copy of the message. */
  replyTo?: string | null
  cc?: string[]
  subject: string
  text: string
  html?: string
  attachments?: MailAttachment[]
  createdBy?: number | null
  /** The course it concerns, so every owner of the course sees it in their outbox. */
  courseId?: number | null
  sendAt?: Date
}

// nodemailer's limits for one delivery: connecting, the server's greeting, and silence on the
// socket after that. A mail job's expiry is derived from them (mailJobExpirySeconds).
export const SMTP_TIMEOUTS_MS = { connection: 10_000, greeting: 10_000, socket: 30_000 }

let transporter: Transporter | undefined

export function mailTransport(): Transporter {
  const smtp = useRuntimeConfig().smtp
  transporter ??= nodemailer.createTransport({
    host: smtp.host,
    port: Number(smtp.port),
    secure: Boolean(smtp.secure),
    ignoreTLS: Boolean(smtp.ignoreTls),
    auth: smtp.user ? { user: smtp.user, pass: smtp.pass } : undefined,
    connectionTimeout: SMTP_TIMEOUTS_MS.connection,
    greetingTimeout: SMTP_TIMEOUTS_MS.greeting,
    socketTimeout: SMTP_TIMEOUTS_MS.socket,
  })
  return transporter
}

/** The mail settings (runtimeConfig.mail, NUXT_MAIL_*), as numbers. */
export function mailSettings() {
  const mail = useRuntimeConfig().mail
  return {
    retryLimit: Number(mail.retryLimit),
    retryDelaySeconds: Number(mail.retryDelaySeconds),
    pollSeconds: Number(mail.pollSeconds),
    batchSize: Number(mail.batchSize),
    recordRetrySeconds: Number(mail.recordRetrySeconds),
    sweepSeconds: Number(mail.sweepSeconds),
    maintenanceSeconds: Number(mail.maintenanceSeconds),
  }
}

/**
 * How long a worker may hold a batch's jobs before pg-boss hands them to another: the messages
 * of a batch go out side by side, so one delivery at its SMTP limits, plus the claim, the record
 * of the outcome and the jobs' completion, each retried through a blip, and a margin (105 s with
 * the defaults). Past it the job is retried, which is harmless (a message already claimed or
 * sent is skipped); a worker that died is noticed far sooner by the sweep (workers/mail-sweep.ts).
 */
export function mailJobExpirySeconds(): number {
  const smtp = (SMTP_TIMEOUTS_MS.connection + SMTP_TIMEOUTS_MS.greeting + SMTP_TIMEOUTS_MS.socket) / 1000
  return Math.ceil(smtp + 3 * mailSettings().recordRetrySeconds + 10)
}

// A job itself is retried only when it expired (its worker stalled or died) or its batch could
// not be claimed; the message's own schedule after an SMTP failure lives in its row (a new job
// per attempt, server/workers/mail-delivery.ts), so the job's retries can come back quickly.
const JOB_RETRY_DELAY_SECONDS = 5

/** pg-boss options for every mail job, and the queue's defaults. */
export function mailJobOptions() {
  return {
    retryLimit: mailSettings().retryLimit,
    retryDelay: JOB_RETRY_DELAY_SECONDS,
    retryBackoff: true,
    expireInSeconds: mailJobExpirySeconds(),
  }
}

/** One delivery job for a message, inserted through the caller's transaction; `startAfter` (a date, or seconds) delays it. */
export async function scheduleMailJob(db: Kysely<Database> | Transaction<Database>, messageId: number, startAfter?: Date | number) {
  const boss = await useQueue()
  await boss.send(MAIL_QUEUE, { messageId }, { ...mailJobOptions(), startAfter, db: inTransaction(db) })
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
      replyTo: mail.replyTo ?? null,
      ccAddresses: mail.cc ?? [],
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
  await scheduleMailJob(db, inserted.id, mail.sendAt)
  return { id: inserted.id, created: true }
}

/** Puts a failed message back in the queue with a fresh set of attempts. */
export async function requeueMail(id: number) {
  await useDb().transaction().execute(async (trx) => {
    const row = await trx.updateTable('mailMessages')
      .set({ status: 'queued', attempts: 0, lastError: null, claimedBy: null, claimedAt: null, updatedAt: new Date() })
      .where('id', '=', id).where('status', '=', 'failed').returning('id').executeTakeFirst()
    if (row) await scheduleMailJob(trx, id)
  })
}

/**
 * Stable per message, so a second attempt after an unknown outcome (the sender stopped between
 * the server's "250 OK" and our record of it) carries the same Message-ID as the first and the
 * receiving side can drop the copy. Depends only on the row and the app's host name.
 */
export function messageIdFor(id: number, key: string) {
  const host = new URL(useRuntimeConfig().public.appUrl).hostname || 'halocline.local'
  return `<halocline.${id}.${createHash('sha256').update(key).digest('hex').slice(0, 12)}@${host}>`
}
