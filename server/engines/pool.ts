// A pool of worker threads for the engines (tinypool), with the limits a shared server needs:
// a time budget per task (the worker is terminated when it runs over, and a fresh one takes its
// place), a bounded queue (a full queue is refused at once rather than grown without end) and
// a bound on the time a task may wait in that queue. No Nitro here, so tests can drive it.
import { MessageChannel } from 'node:worker_threads'
import Tinypool from 'tinypool'
import { fromPlainError } from './errors'
import type { EngineMessage, EngineReply } from './worker'
import type { EngineTaskInput, EngineTaskName, EngineTaskOutput } from './tasks'

export interface EnginePoolOptions {
  /** The worker module (server/engines/worker.ts, or the file the build made of it). */
  filename: string | URL
  threads: number
  /** Tasks that may wait for a thread beside the `threads` running; one more is refused. */
  maxQueue: number
  /** Running time allowed per task, ms. */
  taskTimeoutMs: number
  /** Time a task may wait for a thread, ms. */
  queueTimeoutMs: number
  execArgv?: string[]
  onError?: (error: unknown) => void
}

/** The pool is full or a task waited too long for a thread: answer 503 and say when to retry. */
export class EngineBusyError extends Error {
  constructor(readonly retryAfterSeconds: number) {
    super('The server is busy with other calculations')
    this.name = 'EngineBusyError'
  }
}

/** A task ran over its time budget; its worker was terminated. */
export class EngineTimeoutError extends Error {
  constructor(readonly timeoutMs: number) {
    super(`The calculation took longer than ${+(timeoutMs / 1000).toFixed(1)} s and was stopped`)
    this.name = 'EngineTimeoutError'
  }
}

export interface EnginePool {
  /** `onTime` hears the task's own running time in the worker (EngineReply.ms). */
  run<K extends EngineTaskName>(
    task: K, payload: EngineTaskInput<K>, transfer?: ArrayBuffer[], onTime?: (ms: number) => void,
  ): Promise<EngineTaskOutput<K>>
  close(): Promise<void>
}

export function createEnginePool(options: EnginePoolOptions): EnginePool {
  const pool = new Tinypool({
    filename: options.filename instanceof URL ? options.filename.href : options.filename,
    minThreads: options.threads,
    maxThreads: options.threads,
    // The bound is kept below (tinypool's own counts a starting worker's place as free).
    maxQueue: Infinity,
    // Kept warm: a new worker pays for loading and priming openchemlib.
    idleTimeout: 0,
    execArgv: options.execArgv,
  })
  // A worker that dies with no task on it is reported here; unhandled, it would end the process.
  pool.on('error', (error: unknown) => options.onError?.(error))
  const retryAfterSeconds = Math.max(1, Math.ceil(options.taskTimeoutMs / 1000 / 3))
  // Tasks accepted and not yet settled: running ones and waiting ones.
  let accepted = 0

  async function run<K extends EngineTaskName>(
    task: K,
    payload: EngineTaskInput<K>,
    transfer: ArrayBuffer[] = [],
    onTime?: (ms: number) => void,
  ): Promise<EngineTaskOutput<K>> {
    if (accepted >= options.threads + options.maxQueue) throw new EngineBusyError(retryAfterSeconds)
    accepted++
    const controller = new AbortController()
    const { port1, port2 } = new MessageChannel()
    let stoppedFor: 'queue' | 'budget' | null = null
    const stop = (why: 'queue' | 'budget') => () => { stoppedFor = why; controller.abort() }
    let timer = setTimeout(stop('queue'), options.queueTimeoutMs)
    port1.once('message', () => {
      clearTimeout(timer)
      timer = setTimeout(stop('budget'), options.taskTimeoutMs)
    })
    const message: EngineMessage = { task, payload, started: port2 }
    try {
      // tinypool types transferList from the last overload of postMessage (an options object).
      const transferList = [port2, ...transfer] as never
      const reply: EngineReply = await pool.run(message, { signal: controller.signal, transferList })
      if (!reply.ok) throw fromPlainError(reply.error)
      onTime?.(reply.ms)
      return reply.value as EngineTaskOutput<K>
    } catch (error) {
      if (stoppedFor === 'budget') throw new EngineTimeoutError(options.taskTimeoutMs)
      if (stoppedFor === 'queue') throw new EngineBusyError(retryAfterSeconds)
      throw error
    } finally {
      accepted--
      clearTimeout(timer)
      port1.close()
    }
  }

  return {
    run,
    close: () => pool.destroy(),
  }
}
