import { CompiledQuery, type Compilable, type Kysely, type RawBuilder } from 'kysely'
import { createDatabase, preparedStatement } from '../database/connection'
import type { Database } from '../database/schema'

// One pool per process, created on first use so the URL comes from runtime config.
let instance: Kysely<Database> | undefined

export function useDb(): Kysely<Database> {
  if (!instance) {
    instance = createDatabase(useRuntimeConfig().databaseUrl, {
      onError: (error) => console.warn(`[db] connection lost: ${error.message}`),
    })
  }
  return instance
}

export async function closeDb(): Promise<void> {
  const db = instance
  instance = undefined
  await db?.destroy()
}

/** A read's values: scalars, or a list sent as one parameter (`any(${ids}::int[])`, never `in`). */
type ReadValue = string | number | boolean | null | number[]

/**
 * A read whose SQL text depends only on its `shape` (a role; which options were given), never
 * on its values: Kysely builds it, rewrites it (CamelCasePlugin) and compiles it once per shape,
 * and every call sends that text with its own values. On a small route that work cost more than
 * the rest of the handler (a tenth of GET /api/courses under load; a tenth of a small review
 * queue). `build` is first called with placeholders for the values, so a value may only be a
 * parameter, never something the code branches on; a list goes in as one parameter (Kysely's
 * `in` writes one placeholder per item, so it cannot take a list here). The text is also sent as
 * a named prepared statement (preparedStatement, server/database/connection.ts): parsed once per
 * connection, and planned once when a plan for any values costs no more.
 */
export function compiledOnce<S extends string, V extends ReadValue[], O>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => Compilable<O> | RawBuilder<O>,
): (db: Kysely<Database>, shape: S, ...values: V) => Promise<O[]> {
  const plans = new Map<S, { sql: string, parameters: Array<number | { fixed: unknown }> }>()
  return async (db, shape, ...values) => {
    let plan = plans.get(shape)
    if (!plan) {
      const marks = values.map((_, i) => `\u0000value ${i}\u0000`)
      const built = build(db, shape, ...(marks as V))
      const query = 'isRawBuilder' in built ? built.compile(db) : built.compile()
      const parameters = query.parameters.map((p) => (typeof p === 'string' && marks.includes(p) ? marks.indexOf(p) : { fixed: p }))
      if (marks.some((m) => query.sql.includes(m))) throw new Error(`compiledOnce(${shape}): a value was written into the SQL text`)
      plan = { sql: query.sql, parameters }
      plans.set(shape, plan)
      preparedStatement(plan.sql)
    }
    const parameters = plan.parameters.map((p) => (typeof p === 'number' ? values[p] : p.fixed))
    return (await db.executeQuery<O>(CompiledQuery.raw(plan.sql, parameters))).rows
  }
}

/** compiledOnce on the process's pool. */
export function readOnceCompiled<S extends string, V extends ReadValue[], O>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => Compilable<O> | RawBuilder<O>,
): (shape: S, ...values: V) => Promise<O[]> {
  const read = compiledOnce(build)
  return (shape, ...values) => read(useDb(), shape, ...values)
}
