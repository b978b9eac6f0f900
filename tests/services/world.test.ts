import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { closeTestDb, testDb } from '../support/db'

afterAll(closeTestDb)

// The service project's database is migrated and seeded like the product's own.
describe('service test database', () => {
  it('has every migration applied and the demo course seeded', async () => {
    const db = testDb()
    const pending = await sql<{ n: number }>`select count(*)::int as n from kysely_migration`.execute(db)
    expect(pending.rows[0]!.n).toBeGreaterThan(10)
    const courses = await db.selectFrom('courses').select('id').execute()
    expect(courses.length).toBeGreaterThan(0)
  })
})
