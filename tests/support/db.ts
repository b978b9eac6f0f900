import { randomUUID } from 'node:crypto'
import { inject } from 'vitest'
import type { Kysely } from 'kysely'
import { createDatabase } from '../../server/database/connection'
import type { Database, Role } from '../../server/database/schema'
import { hashUserPassword } from '../../server/utils/password'

let db: Kysely<Database> | undefined

/** Direct access to the test database, for arranging data and checking what was written. */
export function testDb(): Kysely<Database> {
  // A test's reads queue behind its own slow ones on two busy cores: wait for a connection
  // rather than fail after the server's 3 s (which is there so a request answers 503 at once).
  db ??= createDatabase(inject('databaseUrl'), { max: 2, onError: () => {}, connectionTimeoutMillis: 30_000 })
  return db
}

export async function closeTestDb() {
  await db?.destroy()
  db = undefined
}

let sharedHash: Promise<string> | undefined
export const TEST_PASSWORD = 'a-long-test-password-42'

/** A fresh account with a unique e-mail, so tests never lock or change the demo accounts. */
export async function createUser(role: Role, overrides: { name?: string, email?: string } = {}) {
  sharedHash ??= hashUserPassword(TEST_PASSWORD)
  const email = overrides.email ?? `${role}-${randomUUID().slice(0, 8)}@test.example`
  const row = await testDb()
    .insertInto('users')
    .values({ email, name: overrides.name ?? `Test ${role}`, role, passwordHash: await sharedHash })
    .returning(['id', 'email'])
    .executeTakeFirstOrThrow()
  return { ...row, password: TEST_PASSWORD }
}
