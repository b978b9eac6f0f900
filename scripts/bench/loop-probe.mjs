// Loaded into the benchmark's server with NODE_OPTIONS=--import: measures how long the event
// loop is held (perf_hooks.monitorEventLoopDelay). On SIGUSR2 it writes what it saw since the
// last signal to HALOCLINE_LOOP_PROBE_FILE and starts again. Worker threads are left alone.
import { writeFileSync } from 'node:fs'
import { monitorEventLoopDelay } from 'node:perf_hooks'
import { isMainThread } from 'node:worker_threads'

const file = process.env.HALOCLINE_LOOP_PROBE_FILE
if (isMainThread && file) {
  const delay = monitorEventLoopDelay({ resolution: 10 })
  delay.enable()
  const ms = (ns) => ns / 1e6
  process.on('SIGUSR2', () => {
    writeFileSync(file, JSON.stringify({
      at: Date.now(),
      p50: ms(delay.percentile(50)),
      p99: ms(delay.percentile(99)),
      max: ms(delay.max),
      samples: delay.count,
    }))
    delay.reset()
  })
}
