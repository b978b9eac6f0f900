import { CompiledQuery, type Compilable, type Kysely, type RawBuilder } from 'kysely'
import { createDatabase, poolOf, preparedStatement } from '../database/connection'
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

/** A statement's values: scalars, bytes, or a list sent as one parameter (`any(${ids}::int[])`, never `in`). */
type ReadValue = string | number | boolean | null | number[] | Uint8Array

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
  const planFor = plansOf(build)
  return async (db, shape, ...values) => {
    const { sql, parameters } = planFor(db, shape, values)
    return (await db.executeQuery<O>(CompiledQuery.raw(sql, parameters))).rows
  }
}

/** The SQL text of each shape, compiled on first use, and each call's parameters in it. */
function plansOf<S extends string, V extends ReadValue[], O>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => Compilable<O> | RawBuilder<O>,
) {
  const plans = new Map<S, { sql: string, name: string, parameters: Array<number | { fixed: unknown }> }>()
  return (db: Kysely<Database>, shape: S, values: V) => {
    let plan = plans.get(shape)
    if (!plan) {
      const marks = values.map((_, i) => `\u0000value ${i}\u0000`)
      const built = build(db, shape, ...(marks as V))
      const query = 'isRawBuilder' in built ? built.compile(db) : built.compile()
      const parameters = query.parameters.map((p) => (typeof p === 'string' && marks.includes(p) ? marks.indexOf(p) : { fixed: p }))
      if (marks.some((m) => query.sql.includes(m))) throw new Error(`compiledOnce(${shape}): a value was written into the SQL text`)
      plan = { sql: query.sql, name: preparedStatement(query.sql), parameters }
      plans.set(shape, plan)
    }
    return { sql: plan.sql, name: plan.name, parameters: plan.parameters.map((p) => (typeof p === 'number' ? values[p] : p.fixed)) }
  }
}

/** compiledOnce on the process's pool. */
export function readOnceCompiled<S extends string, V extends ReadValue[], O>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => Compilable<O> | RawBuilder<O>,
): (shape: S, ...values: V) => Promise<O[]> {
  const read = compiledOnce(build)
  return (shape, ...values) => read(useDb(), shape, ...values)
}

/**
 * A read of one row and one text column (an answer's JSON, written by PostgreSQL; null for none)
 * compiled once per shape like compiledOnce. On the process's pool it goes without Kysely's
 * executor, under the name preparedStatement gave its text, so each connection prepares it once: on a
 * route whose answer is one short list, acquiring the connection through Kysely, its row objects
 * and the JSON written again in JS were most of what the route cost beyond the framework, and
 * planning the forecast's read cost PostgreSQL about as much as running it. In a transaction
 * (any other `db`) it goes through Kysely. The text is sent as it is (sendJsonText,
 * sendJsonBytes in server/utils/json-text.ts).
 */
export function textOnceCompiled<S extends string, V extends ReadValue[]>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => RawBuilder<{ text: string | null }>,
): (db: Kysely<Database>, shape: S, ...values: V) => Promise<string | null> {
  const planFor = plansOf(build)
  return async (db, shape, ...values) => {
    const { sql, name, parameters } = planFor(db, shape, values)
    const pool = poolOf(db)
    if (!pool) return (await db.executeQuery<{ text: string | null }>(CompiledQuery.raw(sql, parameters))).rows[0]!.text
    const { rows } = await pool.query<[string | null]>({ name, text: sql, values: parameters, rowMode: 'array' })
    return rows[0]![0]
  }
}

/** textOnceCompiled on the process's pool, for a read whose text is never null. */
export function readTextOnceCompiled<S extends string, V extends ReadValue[]>(
  build: (db: Kysely<Database>, shape: S, ...values: V) => RawBuilder<{ text: string }>,
): (shape: S, ...values: V) => Promise<string> {
  const read = textOnceCompiled(build)
  return async (shape, ...values) => (await read(useDb(), shape, ...values))!
}
