import type { Kysely } from 'kysely'
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
