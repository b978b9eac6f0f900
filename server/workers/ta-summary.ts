import type PgBoss from 'pg-boss'
import { useRuntimeConfig } from 'nitropack/runtime'
import { queueTaSummaries } from '../services/notifications'
import { useDb } from '../utils/db'

// The TAs' daily summary as a scheduled queue job: pg-boss keeps the schedule in the database
// and hands each run to one process. 12:00 UTC is early morning across the Americas (from
// memory: UTC-5 to UTC-8), before a TA's first review session of the day.
export const TA_SUMMARY_QUEUE = 'ta-summary'
const DAILY_AT = '0 12 * * *'

/** One run of the job: the summaries of the last day (the test route calls this too). */
export function runTaSummaryJob(now = new Date()) {
  return queueTaSummaries(useDb(), now, useRuntimeConfig().public.appUrl)
}

export async function startTaSummaries(boss: PgBoss): Promise<() => Promise<void>> {
  await boss.createQueue(TA_SUMMARY_QUEUE, { name: TA_SUMMARY_QUEUE, retryLimit: 3, retryDelay: 300 })
  await boss.schedule(TA_SUMMARY_QUEUE, DAILY_AT, {}, { tz: 'UTC' })
  await boss.work(TA_SUMMARY_QUEUE, async () => {
    await runTaSummaryJob()
  })
  return () => boss.offWork(TA_SUMMARY_QUEUE)
}
