import { setTimeout as sleep } from 'node:timers/promises'
import { isDatabaseUnavailable } from './errors'

/**
 * Runs `work` again while PostgreSQL is unreachable (restart, failover), backing off from 100 ms
 * to 2 s, for at most `seconds`; any other error, or the last outage error, is thrown. For
 * writes that must not be lost to a blip. `work` must be safe to repeat: a commit whose reply
 * was lost runs a second time.
 */
export async function retryWhileDatabaseDown<T>(work: () => Promise<T>, seconds: number): Promise<T> {
  const deadline = Date.now() + seconds * 1000
  for (let delayMs = 100; ; delayMs = Math.min(delayMs * 2, 2000)) {
    try {
      return await work()
    } catch (error) {
      if (!isDatabaseUnavailable(error) || Date.now() + delayMs > deadline) throw error
      await sleep(delayMs)
    }
  }
}
