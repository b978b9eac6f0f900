import { sql } from 'kysely'

export interface ClassRow {
  submissionId: number
  sectionId: number
  unitKey: string
  /** 'pending' until a reviewer accepts it. */
  status: 'pending' | 'accepted'
  secondary: number | null
  tertiary: number | null
  molePercents: Array<{ smiles: string, percent: number }>
  excludedAt: Date | null
  exclusionReason: string | null
}

/**
 * Each work unit's latest accepted-or-pending version of a practical, in one query
 * (DISTINCT ON over the unit, newest version first). Returned and superseded versions drop out.
 */
export async function latestClassResults(practicalId: number): Promise<ClassRow[]> {
  const { rows } = await sql<ClassRow>`
    select distinct on (s.unit_key)
      s.id as "submissionId", s.section_id as "sectionId", s.unit_key as "unitKey", s.status,
      s.factor_secondary as "secondary", s.factor_tertiary as "tertiary",
      s.result -> 'molePercents' as "molePercents",
      s.excluded_at as "excludedAt", s.exclusion_reason as "exclusionReason"
    from submissions s
    where s.practical_id = ${practicalId} and s.status in ('pending', 'accepted')
    order by s.unit_key, s.version desc`.execute(useDb().withoutPlugins())
  return rows
}
