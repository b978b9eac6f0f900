import { sql } from 'kysely'
import { createDatabase } from './connection'
import { migrateToLatest } from './migrator'
import { seedDemo, type SeedOptions } from './seed'
import { seedDepartment } from './seed/department'
import { DEMO_PASSWORD } from './seed/people'
import { hashUserPassword } from '../utils/password'

// Entry points for npm start and the test set-up; both run them outside Nitro.
export async function migrate(url: string) {
  const db = createDatabase(url, { max: 1 })
  try {
    return await migrateToLatest(db)
  } finally {
    await db.destroy()
  }
}

/** Seeds only an empty database, so a restart never duplicates or overwrites real data. */
export async function seedDemoIfEmpty(url: string, options: SeedOptions = {}): Promise<boolean> {
  const db = createDatabase(url, { max: 2 })
  try {
    const { rows } = await sql<{ n: number }>`select count(*)::int as n from users`.execute(db)
    if (rows[0]!.n > 0) return false
    await seedDemo(db, options)
    return true
  } finally {
    await db.destroy()
  }
}

/** Adds sections to the department benchmark's course (scripts/bench/department.mjs); every account's password is the demo's. */
export async function seedDepartmentSections(url: string, fromSection: number, toSection: number) {
  const db = createDatabase(url, { max: 2 })
  try {
    const passwordHash = await hashUserPassword(DEMO_PASSWORD)
    const seeded = await seedDepartment(db, { fromSection, toSection, passwordHash })
    // A bulk load leaves the planner's statistics behind until autovacuum comes round.
    await sql`analyze`.execute(db)
    return seeded
  } finally {
    await db.destroy()
  }
}
