// The engine worker's entry (a worker thread of the pool in server/engines/pool.ts). The build
// emits it as its own file, .output/server/workers/engines.mjs (see nuxt.config.ts), next to
// the chunks it shares with the server. It answers { ok, value } or { ok: false, error } so
// that engine errors keep their class and fields across the thread boundary.
import type { MessagePort } from 'node:worker_threads'
import { analyzeSubstrate } from '../../shared/utils/halogenation'
import { depictSubstrate } from '../../shared/utils/depiction'
import { toPlainError, type PlainEngineError } from './errors'
import { runEngineTask, type EngineTaskName } from './tasks'

export interface EngineMessage {
  task: EngineTaskName
  payload: unknown
  /** Told when the task starts, so the time budget counts running time, not time in the queue. */
  started?: MessagePort
}

/** `ms`: the task's own time in this thread, without the queue and the hand-offs (Server-Timing). */
export type EngineReply = { ok: true, value: unknown, ms: number } | { ok: false, error: PlainEngineError }

// openchemlib builds its tables on first use (about half a second here): pay that while the
// worker starts, not inside the first request's time budget.
analyzeSubstrate('CC(C)C(C)C')
depictSubstrate('CC(C)C(C)C')

export default async function runInWorker(message: EngineMessage): Promise<EngineReply> {
  // The pool closes the channel when the task settles.
  message.started?.postMessage('started')
  const started = performance.now()
  try {
    const value = await runEngineTask(message.task, message.payload as never)
    return { ok: true, value, ms: performance.now() - started }
  } catch (error) {
    return { ok: false, error: toPlainError(error) }
  }
}
