import type { Kysely } from 'kysely'
import type { Database } from '../schema'
import { hashUserPassword } from '../../utils/password'
import { isoDateOf } from '../../../shared/utils/dates'
import type { SeedContext } from './context'
import { DEMO_PASSWORD, demoPeople, seedPeople } from './people'
import { seedLibrary } from './library'
import { seedCourse } from './course'
import { seedPracticals } from './practicals'
import { seedStockroom } from './stockroom'
import { seedSubmissions } from './submissions'

export interface SeedOptions {
  /** The day the demo is seeded; every date in the scenario is set relative to it. */
  today?: Date
}

/**
 * The whole demo scenario, in one transaction, each part in its own file. Demo accounts share
 * one published password but each gets a hash (and salt) of its own, as real accounts do:
 * argon2id makes that well under a second for all of them.
 */
export async function seedDemo(db: Kysely<Database>, options: SeedOptions = {}) {
  const people = demoPeople()
  const hashes = await Promise.all(people.map(() => hashUserPassword(DEMO_PASSWORD)))
  await db.transaction().execute(async (trx) => {
    const ctx: SeedContext = {
      db: trx,
      today: isoDateOf(options.today ?? new Date()),
      users: await seedPeople(trx, people.map((p, i) => ({ ...p, passwordHash: hashes[i]! }))),
      ids: { sections: new Map(), substrates: new Map(), methods: new Map(), practicals: new Map() },
    }
    await seedLibrary(ctx)
    await seedCourse(ctx)
    await seedPracticals(ctx)
    await seedSubmissions(ctx)
    await seedStockroom(ctx)
  })
}
