import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { fileURLToPath } from 'node:url'
import { createEnginePool, EngineBusyError, EngineTimeoutError, type EnginePool } from '../engines/pool'
import type { EngineTaskInput, EngineTaskName, EngineTaskOutput } from '../engines/tasks'

// Parsing uploads, reading SMILES, drawing molecules and detecting peaks take from milliseconds to
// seconds of CPU; on the request loop one such request stalls every other user. They run in a
// pool of worker threads instead (server/engines/). One thread per core but one: the loop keeps
// a core for HTTP, sessions and SQL (on 2 cores, one worker thread).

let pool: EnginePool | null = null

function enginePool(): EnginePool {
  if (pool) return pool
  const config = useRuntimeConfig().engines
  // The build emits the worker next to the server's entry (nuxt.config.ts, "engine-worker").
  const filename = new URL('./workers/engines.mjs', import.meta.url)
  if (!existsSync(fileURLToPath(filename))) {
    throw new Error(`The engine worker is missing at ${fileURLToPath(filename)}; rebuild with nuxt build`)
  }
  pool = createEnginePool({
    filename,
    threads: Number(config.threads) > 0 ? Number(config.threads) : Math.max(1, Math.min(4, availableParallelism() - 1)),
    maxQueue: Number(config.maxQueue),
    taskTimeoutMs: Number(config.taskTimeoutMs),
    queueTimeoutMs: Number(config.queueTimeoutMs),
    onError: (error) => console.error('[engines] a worker failed', error),
  })
  return pool
}

/** Starts the worker threads ahead of the first request (server/plugins/engines.ts). */
export function startEngines() {
  if (import.meta.dev) return
  // Plugins run while the server's modules are still loading, before the entry has told them
  // its own address (import.meta.url): start on the next turn of the loop.
  setImmediate(() => {
    try {
      enginePool()
    } catch (error) {
      console.error('[engines] not started:', (error as Error).message)
    }
  })
}

export async function stopEngines() {
  const current = pool
  pool = null
  await current?.close()
}

/**
 * Runs an engine task off the request loop. Engine errors come back as their own classes
 * (asBadRequest, computeRun and the error handler treat them as before); a full pool is a 503
 * with Retry-After, a task over its time budget a 422 that says so. `field` names what the
 * request sent ("file", "smiles") in that message; `onTime` hears the task's own time in the worker.
 */
export async function runEngine<K extends EngineTaskName>(
  task: K,
  payload: EngineTaskInput<K>,
  options: { field?: string, transfer?: ArrayBuffer[], onTime?: (ms: number) => void } = {},
): Promise<EngineTaskOutput<K>> {
  // The dev server has no built worker file; it runs the same task inline.
  if (import.meta.dev) return import('../engines/tasks').then((m) => m.runEngineTask(task, payload))
  try {
    return await enginePool().run(task, payload, options.transfer, options.onTime)
  } catch (error) {
    const prefix = options.field ? `${options.field}: ` : ''
    if (error instanceof EngineBusyError) {
      throw createError({
        statusCode: 503,
        statusMessage: 'The server is busy with other calculations; try again in a few seconds',
        data: { retryAfterSeconds: error.retryAfterSeconds },
      })
    }
    if (error instanceof EngineTimeoutError) {
      throw createError({
        statusCode: 422,
        statusMessage: `${prefix}took too long to compute (over ${+(error.timeoutMs / 1000).toFixed(1)} s) and was stopped`,
        data: { timeoutMs: error.timeoutMs },
      })
    }
    throw error
  }
}
