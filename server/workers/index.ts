import { useRuntimeConfig } from '#imports'
import type PgBoss from 'pg-boss'
import { MAIL_QUEUE } from '../utils/queue'
import { deliverMail } from '../utils/mail'

const MAIL_BATCH = 25

// Every queue and its worker, registered once the queue has started. Explicit (not a side
// effect of importing a module) because Nitro loads route chunks lazily.
export async function registerWorkers(boss: PgBoss) {
  const config = useRuntimeConfig()
  await boss.createQueue(MAIL_QUEUE)
  // pg-boss waits a whole polling interval after every fetch, so one job per fetch would send a
  // section digest at one message per interval. A batch goes out in one pass; a failed message
  // is failed on its own (its retry and backoff), and pg-boss then completes only the rest,
  // because completion touches active jobs only.
  await boss.work<{ messageId: number }>(MAIL_QUEUE, {
    batchSize: MAIL_BATCH,
    pollingIntervalSeconds: Number(config.mail.pollSeconds),
  }, async (jobs) => {
    for (const job of jobs) {
      try {
        await deliverMail(job.data.messageId)
      } catch (error) {
        await boss.fail(MAIL_QUEUE, job.id, { message: error instanceof Error ? error.message : String(error) })
      }
    }
  })
}
