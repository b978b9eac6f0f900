import { useRuntimeConfig } from 'nitropack/runtime'
import { sql, type Selectable } from 'kysely'
import type { MailMessagesTable } from '../database/schema'
import { useDb } from '../utils/db'
import { mailSettings, mailTransport, messageIdFor, scheduleMailJob } from '../utils/mail'
import { presenceAlive } from '../utils/presence'

// The steps of one delivery, each a short write keyed to the sending process, so any of them
// can be repeated after a database blip and another process can tell whose message is whose:
//   claim (queued/retrying -> sending, claimed_by = our presence key, one more attempt)
//   send (SMTP, with the message's stable Message-ID)
//   record (sent, or retrying with a new delayed job, or failed), only while still ours.
// A claim whose owner died is released by the sweep (releaseClaims), marked as an unknown outcome.

export type MailRow = Selectable<MailMessagesTable>
export type SendOutcome = { sent: true, providerMessageId: string | null } | { sent: false, error: string }

/** Claims the fetched messages that are still waiting. They go out side by side, so each claim is an attempt. */
export async function claimMessages(ids: number[], key: number): Promise<MailRow[]> {
  if (!ids.length) return []
  return useDb().updateTable('mailMessages')
    .set((eb) => ({ status: 'sending', claimedBy: key, claimedAt: sql`now()`, attempts: eb('attempts', '+', 1), updatedAt: new Date() }))
    .where('id', 'in', ids)
    .where('status', 'in', ['queued', 'retrying'])
    .returningAll()
    .execute()
}

/** The SMTP conversation. Never throws: a refusal or a lost connection is an outcome to record. */
export async function sendClaimed(row: MailRow): Promise<SendOutcome> {
  try {
    const info = await mailTransport().sendMail({
      from: useRuntimeConfig().smtp.from,
      to: row.toAddresses,
      cc: row.ccAddresses?.length ? row.ccAddresses : undefined,
      replyTo: row.replyTo ?? undefined,
      subject: row.subject,
      text: row.textBody,
      html: row.htmlBody ?? undefined,
      attachments: row.attachments.map((a) => ({
        filename: a.filename,
        contentType: a.contentType,
        content: a.content,
        encoding: 'base64',
      })),
      messageId: messageIdFor(row.id, row.dedupeKey),
    })
    return { sent: true, providerMessageId: info.messageId ?? null }
  } catch (error) {
    return { sent: false, error: error instanceof Error ? error.message : String(error) }
  }
}

/** The next attempt's delay: retryDelaySeconds doubled per attempt, with jitter, at most an hour. */
export function retryDelaySeconds(attempts: number, base = mailSettings().retryDelaySeconds) {
  const step = base * 2 ** Math.min(16, Math.max(0, attempts - 1))
  return Math.min(3600, step * (1 + Math.random()))
}

/**
 * Writes what happened to a claimed message, if it is still ours (another process may have
 * released it while we could not reach the database). Safe to repeat: once written, the row is
 * no longer 'sending' and a second run changes nothing.
 */
export async function recordOutcome(row: MailRow, outcome: SendOutcome, key: number): Promise<void> {
  const db = useDb()
  if (outcome.sent) {
    await db.updateTable('mailMessages')
      .set({
        status: 'sent',
        sentAt: new Date(),
        providerMessageId: outcome.providerMessageId,
        lastError: null,
        claimedBy: null,
        claimedAt: null,
        updatedAt: new Date(),
      })
      .where('id', '=', row.id).where('status', '=', 'sending').where('claimedBy', '=', key)
      .execute()
    return
  }
  const exhausted = row.attempts > mailSettings().retryLimit
  await db.transaction().execute(async (trx) => {
    const updated = await trx.updateTable('mailMessages')
      .set({ status: exhausted ? 'failed' : 'retrying', lastError: outcome.error, claimedBy: null, claimedAt: null, updatedAt: new Date() })
      .where('id', '=', row.id).where('status', '=', 'sending').where('claimedBy', '=', key)
      .returning('id').executeTakeFirst()
    if (updated && !exhausted) await scheduleMailJob(trx, row.id, retryDelaySeconds(row.attempts))
  })
}

/**
 * Puts messages claimed by `claimant` back in the queue with a job each, in one transaction.
 * `whenDead`: only if that process holds no presence lock (checked in the same statement);
 * such an attempt's outcome is unknown, and the row says so. `ids` narrows it to some messages.
 */
export async function releaseClaims(
  claimant: number | null,
  options: { ids?: number[], whenDead: boolean, reason: string },
): Promise<number[]> {
  return useDb().transaction().execute(async (trx) => {
    let query = trx.updateTable('mailMessages')
      .set((eb) => ({
        status: 'retrying',
        claimedBy: null,
        claimedAt: null,
        lastError: options.reason,
        unknownOutcomes: options.whenDead ? eb('unknownOutcomes', '+', 1) : eb.ref('unknownOutcomes'),
        updatedAt: new Date(),
      }))
      .where('status', '=', 'sending')
    query = claimant === null ? query.where('claimedBy', 'is', null) : query.where('claimedBy', '=', claimant)
    if (options.ids) query = query.where('id', 'in', options.ids.length ? options.ids : [-1])
    if (options.whenDead && claimant !== null) query = query.where((eb) => eb.not(presenceAlive(eb.ref('claimedBy'))))
    const released = await query.returning('id').execute()
    for (const { id } of released) await scheduleMailJob(trx, id)
    return released.map((r) => r.id)
  })
}

/** Claimants of 'sending' messages other than `key` that hold no presence lock (null: an older version's rows). */
export async function deadClaimants(key: number): Promise<Array<number | null>> {
  const rows = await useDb().selectFrom('mailMessages')
    .select('claimedBy').distinct()
    .where('status', '=', 'sending')
    .where((eb) => eb.or([
      eb('claimedBy', 'is', null),
      eb.and([eb('claimedBy', '<>', key), eb.not(presenceAlive(eb.ref('claimedBy')))]),
    ]))
    .execute()
  return rows.map((r) => r.claimedBy)
}

/** The messages this process has claimed, by id. */
export async function ownClaims(key: number): Promise<number[]> {
  const rows = await useDb().selectFrom('mailMessages').select('id').where('status', '=', 'sending').where('claimedBy', '=', key).execute()
  return rows.map((r) => r.id)
}
