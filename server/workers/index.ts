import { useRuntimeConfig } from '#imports'
import type PgBoss from 'pg-boss'
import { MAIL_QUEUE } from '../utils/queue'
import { deliverMail } from '../utils/mail'

// Every queue and its worker, registered once the queue has started. Explicit (not a side
// effect of importing a module) because Nitro loads route chunks lazily.
export async function registerWorkers(boss: PgBoss) {
  const config = useRuntimeConfig()
  await boss.createQueue(MAIL_QUEUE)
  await boss.work<{ messageId: number }>(MAIL_QUEUE, {
    batchSize: 1,
    pollingIntervalSeconds: Number(config.mail.pollSeconds),
  }, async ([job]) => {
    if (job) await deliverMail(job.data.messageId)
  })
}
