import { CompiledQuery, type Compilable, type Kysely } from 'kysely'
import { createDatabase } from '../database/connection'
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

/**
 * A read whose SQL text depends only on its `shape` (a role; which options were given), never
 * on its values: Kysely builds it, rewrites it (CamelCasePlugin) and compiles it once per shape,
 * and every call sends that text with its own values. On a small route that work cost more than
 * the rest of the handler (a tenth of GET /api/courses under load). `build` is first called with
 * placeholders for the values, so a value may only be a parameter: never a list (`in` writes one
 * placeholder per item) nor something the code branches on.
 */
export function readOnceCompiled<S extends string, V extends Array<string | number | boolean | null>, O>(
  build: (shape: S, ...values: V) => Compilable<O>,
): (shape: S, ...values: V) => Promise<O[]> {
  const plans = new Map<S, { sql: string, parameters: Array<number | { fixed: unknown }> }>()
  return async (shape, ...values) => {
    let plan = plans.get(shape)
    if (!plan) {
      const marks = values.map((_, i) => `\u0000value ${i}\u0000`)
      const query = build(shape, ...(marks as V)).compile()
      const parameters = query.parameters.map((p) => (typeof p === 'string' && marks.includes(p) ? marks.indexOf(p) : { fixed: p }))
      if (marks.some((m) => query.sql.includes(m))) throw new Error(`readOnceCompiled(${shape}): a value was written into the SQL text`)
      plan = { sql: query.sql, parameters }
      plans.set(shape, plan)
    }
    const parameters = plan.parameters.map((p) => (typeof p === 'number' ? values[p] : p.fixed))
    return (await useDb().executeQuery(CompiledQuery.raw(plan.sql, parameters))).rows as O[]
  }
}
