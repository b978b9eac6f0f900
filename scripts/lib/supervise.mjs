// Keeps one child process running for npm start: when it dies on its own, it is started again
// after a back-off that doubles from 1 s up to 30 s, and goes back to 1 s once a run has
// lasted a minute. Each restart is one log line. Only stop() ends it for good.

/**
 * @param {{ name: string, start: () => Promise<import('node:child_process').ChildProcess>,
 *   log?: (line: string) => void, initialDelayMs?: number, maxDelayMs?: number, stableAfterMs?: number }} options
 */
export function supervise({ name, start, log = console.log, initialDelayMs = 1000, maxDelayMs = 30_000, stableAfterMs = 60_000 }) {
  let child = null
  let stopping = false
  let timer = null
  let delayMs = initialDelayMs

  const restartLater = (why, startedAt) => {
    if (stopping) return
    if (Date.now() - startedAt >= stableAfterMs) delayMs = initialDelayMs
    log(`${name} ${why}; starting it again in ${formatDelay(delayMs)}`)
    timer = setTimeout(() => {
      timer = null
      void launch(false).catch(() => {})
    }, delayMs)
    delayMs = Math.min(delayMs * 2, maxDelayMs)
  }

  async function launch(first) {
    const startedAt = Date.now()
    let started
    try {
      started = await start()
    } catch (error) {
      // The first start failing is the caller's to report (a port in use, a broken build).
      if (!first) restartLater(`did not start (${error.message.split('\n')[0]})`, startedAt)
      throw error
    }
    if (stopping) {
      started.kill('SIGTERM')
      return started
    }
    child = started
    started.once('exit', (code, signal) => {
      if (child === started) child = null
      restartLater(`stopped (${signal ? `signal ${signal}` : `exit code ${code}`})`, startedAt)
    })
    return started
  }

  return {
    /** The first start; rejects if it fails (the caller reports it), while restarts keep going. */
    first: launch(true),
    current: () => child,
    /** Stops the child (SIGTERM, then SIGKILL after `graceMs`) and restarts no more. */
    async stop(graceMs = 10_000) {
      stopping = true
      clearTimeout(timer)
      const running = child
      if (!running || running.exitCode !== null || running.signalCode !== null) return
      const exited = new Promise((resolve) => running.once('exit', resolve))
      running.kill('SIGTERM')
      const killer = setTimeout(() => running.kill('SIGKILL'), graceMs)
      await exited
      clearTimeout(killer)
    },
  }
}

function formatDelay(ms) {
  return ms >= 1000 ? `${ms / 1000} s` : `${ms} ms`
}
