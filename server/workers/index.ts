import type PgBoss from 'pg-boss'
import { MAIL_QUEUE } from '../utils/queue'
import { mailJobOptions } from '../utils/mail'
import type { Presence } from '../utils/presence'
import { MailWorker } from './mail-worker'
import { startMailSweep } from './mail-sweep'
import { startTaSummaries } from './ta-summary'

// Every queue and its worker, started once the queue has. Explicit (not a side effect of
// importing a module) because Nitro loads route chunks lazily. Returns what stops them.
export async function registerWorkers(boss: PgBoss, presence: Presence): Promise<() => Promise<void>> {
  // Queue defaults; each job also carries them (scheduleMailJob), so older jobs keep theirs.
  const options = { name: MAIL_QUEUE, ...mailJobOptions() }
  await boss.createQueue(MAIL_QUEUE, options)
  await boss.updateQueue(MAIL_QUEUE, options)
  const worker = new MailWorker(boss, presence)
  worker.start()
  const stopSweep = startMailSweep(worker, presence)
  const stopSummaries = await startTaSummaries(boss)
  return async () => {
    stopSweep()
    await stopSummaries()
    await worker.stop()
  }
}
