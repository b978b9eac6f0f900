import type { Transaction } from 'kysely'
import type { Database } from '../schema'

/** What each part of the demo seed receives and adds to, inside the one seed transaction. */
export interface SeedContext {
  db: Transaction<Database>
  /** The day the demo is seeded, 'YYYY-MM-DD' (UTC); every scenario date is relative to it. */
  today: string
  /** User ids by e-mail. */
  users: Map<string, number>
  /** Ids later parts look up: filled in as the parts run. */
  ids: {
    courseId?: number
    /** Section ids by code ('M1', 'T1', 'W1', 'R1'). */
    sections: Map<string, number>
    /** Substrate ids by library name. */
    substrates: Map<string, number>
    /** Method ids by reagent key ('cl2-light', 'so2cl2-azo', 'br2-light', 'nbs'). */
    methods: Map<string, number>
    /** Practical ids by scenario key ('p1', 'p2'). */
    practicals: Map<string, number>
  }
}
