// Loaded into the profiled server with NODE_OPTIONS=--import (node refuses --cpu-prof there):
// profiles the main thread from start, and on SIGUSR2 writes the profile to
// HALOCLINE_CPU_PROFILE_FILE. Used by scripts/bench/profile.mjs.
import { writeFileSync } from 'node:fs'
import { Session } from 'node:inspector'
import { isMainThread } from 'node:worker_threads'

const file = process.env.HALOCLINE_CPU_PROFILE_FILE
if (isMainThread && file) {
  const session = new Session()
  session.connect()
  session.post('Profiler.enable', () => {
    session.post('Profiler.setSamplingInterval', { interval: 200 }, () => session.post('Profiler.start'))
  })
  process.on('SIGUSR2', () => {
    session.post('Profiler.stop', (error, result) => {
      if (!error) writeFileSync(file, JSON.stringify(result.profile))
    })
  })
}
