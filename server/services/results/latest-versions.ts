import { sql, type Kysely, type RawBuilder } from 'kysely'
import type { Database, SubmissionStatus } from '../../database/schema'
import { useDb } from '../../utils/db'

export interface ClassRow {
  submissionId: number
  sectionId: number
  unitKey: string
  /** 'pending' until a reviewer accepts it. */
  status: SubmissionStatus
  factorSecondary: number | null
  factorTertiary: number | null
  molePercents: Array<{ smiles: string, percent: number }>
  excludedAt: Date | null
  exclusionReason: string | null
}

export interface LatestVersionOptions {
  /** Which versions compete; the class figures count accepted and pending ones (the default). */
  statuses?: SubmissionStatus[]
  /** Leave excluded versions out before choosing: the newest version no reviewer excluded. */
  skipExcluded?: boolean
}

/**
 * The rule behind every class figure: each work unit's newest version among `statuses`, per
 * practical (DISTINCT ON practical and unit, newest version first). Returned and superseded
 * versions drop out; an excluded one stays (with `excludedAt`) unless `skipExcluded`, so callers
 * can list what a reviewer left out. Callers add the columns they need (`s.` is the submission). An id
 * may be SQL over the statement around (`p.id`).
 */
export function latestUnitVersions(
  db: Kysely<Database>, practicalIds: ReadonlyArray<number | RawBuilder<number>>, options: LatestVersionOptions = {},
) {
  return db.selectFrom('submissions as s')
    .distinctOn(['s.practicalId', 's.unitKey'])
    .where('s.practicalId', 'in', practicalIds.length ? [...practicalIds] : [-1])
    .where('s.status', 'in', options.statuses ?? ['pending', 'accepted'])
    .$if(options.skipExcluded === true, (query) => query.where('s.excludedAt', 'is', null))
    .orderBy('s.practicalId').orderBy('s.unitKey').orderBy('s.version', 'desc')
}

/** The mol % per product stored with a version's result. */
export const storedMolePercents = sql<ClassRow['molePercents']>`s.result -> 'molePercents'`

/** Each work unit's latest accepted-or-pending version of one practical, excluded ones included. */
export function latestClassResults(practicalId: number, db: Kysely<Database> = useDb()): Promise<ClassRow[]> {
  return latestUnitVersions(db, [practicalId])
    .select([
      's.id as submissionId', 's.sectionId', 's.unitKey', 's.status', 's.factorSecondary', 's.factorTertiary',
      storedMolePercents.as('molePercents'), 's.excludedAt', 's.exclusionReason',
    ])
    .execute()
}
