import type PgBoss from 'pg-boss'
import { MAIL_QUEUE } from '../utils/queue'
import { mailSettings } from '../utils/mail'
import { retryWhileDatabaseDown } from '../utils/db-retry'
import type { Presence } from '../utils/presence'
import { claimMessages, ownClaims, recordOutcome, releaseClaims, sendClaimed, type MailRow, type SendOutcome } from './mail-delivery'

type MailJob = PgBoss.Job<{ messageId: number }>

/**
 * The mail worker: fetches a small batch, claims it, sends its messages side by side, records
 * each outcome and settles the jobs; then fetches again at once while there is work (pg-boss's
 * own work() would wait a polling interval after every batch). Every write is retried through a
 * database blip; what still cannot be written stays in memory (`unrecorded`) and is written by
 * reconcile() once the database answers, so a message the SMTP server accepted is never sent
 * again by this process. A message is sent again only when its sender died before recording
 * the outcome, and then with the same Message-ID (see mail-sweep.ts).
 */
export class MailWorker {
  private stopping = false
  private loop: Promise<void> | undefined
  private wakeUp: (() => void) | undefined
  /** Messages a batch of ours is working on, from before the claim until the outcome is written. */
  private readonly inFlight = new Set<number>()
  /** Outcomes we know but could not write yet. */
  private readonly unrecorded = new Map<number, { row: MailRow, outcome: SendOutcome }>()

  constructor(private readonly boss: PgBoss, private readonly presence: Presence) {}

  start() {
    this.loop ??= this.run()
  }

  /** Ends the loop after the batch in hand, waiting at most `timeoutMs` for it. */
  async stop(timeoutMs = 10_000) {
    this.stopping = true
    this.wake()
    if (this.loop) await Promise.race([this.loop, new Promise((r) => setTimeout(r, timeoutMs).unref())])
    await this.reconcile().catch(() => {})
  }

  /** Fetch now instead of at the end of the polling interval. */
  wake() {
    this.wakeUp?.()
  }

  private async run() {
    const { batchSize, pollSeconds } = mailSettings()
    while (!this.stopping) {
      // Without our presence lock another process could take our claims for a dead one's.
      const jobs = this.presence.held() ? await this.boss.fetch<{ messageId: number }>(MAIL_QUEUE, { batchSize }).catch(() => []) : []
      if (jobs.length) {
        // runBatch handles what it expects; anything else must not end the loop for good.
        await this.runBatch(jobs).catch((error) => console.warn(`[mail] batch failed: ${messageOf(error)}`))
        continue
      }
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, pollSeconds * 1000)
        this.wakeUp = () => {
          clearTimeout(timer)
          resolve()
        }
      })
      this.wakeUp = undefined
    }
  }

  private async runBatch(jobs: MailJob[]) {
    const { recordRetrySeconds } = mailSettings()
    const jobIds = jobs.map((j) => j.id)
    const ids = [...new Set(jobs.map((j) => j.data.messageId))]
    for (const id of ids) this.inFlight.add(id)
    try {
      let rows: MailRow[]
      try {
        rows = await retryWhileDatabaseDown(() => claimMessages(ids, this.presence.key), recordRetrySeconds)
      } catch (error) {
        // Nothing was sent. Hand the jobs back; if even that fails they expire and come back.
        console.warn(`[mail] could not claim a batch: ${messageOf(error)}`)
        await this.settleJobs(() => this.boss.fail(MAIL_QUEUE, jobIds))
        return
      }
      await Promise.all(rows.map(async (row) => {
        const outcome = await sendClaimed(row)
        try {
          await retryWhileDatabaseDown(() => recordOutcome(row, outcome, this.presence.key), recordRetrySeconds)
        } catch (error) {
          this.unrecorded.set(row.id, { row, outcome })
          console.warn(`[mail] message ${row.id}: outcome (${outcome.sent ? 'sent' : 'not sent'}) not recorded yet: ${messageOf(error)}`)
        }
      }))
      // Every claimed message has its own outcome or its own new job: the fetched jobs are done.
      await this.settleJobs(() => this.boss.complete(MAIL_QUEUE, jobIds))
    } finally {
      for (const id of ids) this.inFlight.delete(id)
    }
  }

  // pg-boss rejects complete/fail while PostgreSQL is down; an unsettled job only expires and
  // comes back to a message that is already claimed or done.
  private async settleJobs(settle: () => Promise<unknown>) {
    try {
      await retryWhileDatabaseDown(settle, mailSettings().recordRetrySeconds)
    } catch (error) {
      console.warn(`[mail] could not settle a batch's jobs; they will expire and be retried: ${messageOf(error)}`)
    }
  }

  /**
   * Writes the outcomes still in memory, and puts back in the queue any message claimed under
   * our key that no batch of ours is working on (a claim whose reply was lost to a blip).
   */
  async reconcile() {
    for (const [id, { row, outcome }] of this.unrecorded) {
      await recordOutcome(row, outcome, this.presence.key)
      this.unrecorded.delete(id)
    }
    const idle = (await ownClaims(this.presence.key)).filter((id) => !this.inFlight.has(id) && !this.unrecorded.has(id))
    if (!idle.length) return 0
    const released = await releaseClaims(this.presence.key, {
      ids: idle,
      whenDead: false,
      reason: 'The database was unreachable while this message was being sent; sending again',
    })
    if (released.length) this.wake()
    return released.length
  }
}

export function messageOf(error: unknown) {
  return error instanceof Error ? error.message : String(error)
}
