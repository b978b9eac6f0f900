/**
 * Tries `attempt` again after a delay that doubles from `firstMs` up to `maxMs`, one try at a
 * time; `succeeded()` starts again from the first delay, `stop()` cancels what is scheduled.
 * Used by the connections a process keeps open to PostgreSQL of its own (presence, account notices).
 */
export function retryWithBackoff(attempt: () => void, { firstMs = 250, maxMs = 2000 } = {}) {
  let timer: ReturnType<typeof setTimeout> | undefined
  let delayMs = firstMs
  let stopped = false
  return {
    schedule() {
      if (stopped || timer) return
      timer = setTimeout(() => {
        timer = undefined
        attempt()
      }, delayMs)
      delayMs = Math.min(delayMs * 2, maxMs)
    },
    succeeded() {
      delayMs = firstMs
    },
    stop() {
      stopped = true
      clearTimeout(timer)
    },
    get stopped() {
      return stopped
    },
  }
}
