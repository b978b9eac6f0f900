import { readlinkSync } from 'node:fs'
import { setPriority } from 'node:os'

// A long engine task and the request loop may want the same core (two cores, shared with
// PostgreSQL): the loop's timers and sockets then waited for the engine's time slice, 70-150 ms
// behind while the chemistry bench ran with nothing of ours on the loop. On Linux each thread has
// its own nice value, so an engine thread steps back (nice 10) and the loop runs first; on an idle
// core the engines lose nothing. Elsewhere setPriority would move the whole process: left alone.
export const ENGINE_THREAD_NICE = 10

/** Called once in each engine worker thread (worker.ts); a main thread is never moved. */
export function yieldToRequestLoop() {
  if (process.platform !== 'linux') return
  try {
    // /proc/thread-self is /proc/<pid>/task/<tid>.
    const threadId = Number(readlinkSync('/proc/thread-self').split('/').pop())
    if (threadId && threadId !== process.pid) setPriority(threadId, ENGINE_THREAD_NICE)
  } catch {
    // Not allowed here (a sandbox): the engines run at the process's priority.
  }
}
