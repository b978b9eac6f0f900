import type { Kysely } from 'kysely'
import type { Database } from '../schema'
import { hashUserPassword } from '../../utils/password'
import { DEMO_PASSWORD, seedPeople } from './people'

export interface SeedOptions {
  /** The day the demo is seeded; every date in the scenario is set relative to it. */
  today?: Date
}

/**
 * The whole demo scenario, in one transaction. Demo accounts share one published password,
 * so they share one hash: 68 separate scrypt runs at OWASP cost would take half a minute.
 */
export async function seedDemo(db: Kysely<Database>, options: SeedOptions = {}) {
  const passwordHash = await hashUserPassword(DEMO_PASSWORD)
  await db.transaction().execute(async (trx) => {
    await seedPeople(trx, passwordHash)
  })
}
