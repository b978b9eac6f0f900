import { createHash } from 'node:crypto'
import { sql } from 'kysely'
import type { SubmissionStatus } from '../../database/schema'
import { useDb } from '../../utils/db'
import type { ClassRow } from './latest-versions'

// The class summary's read, shaped by PostgreSQL: at 20,000 results, reading a row (and a JSON
// document of mole percents) per unit cost more than the statistics. The same rows as
// latestClassResults (each unit's newest accepted-or-pending version, unit order), returned as
// one row of arrays; the mole percents come already gathered per product, in unit order and
// then in their stored order, so the means are summed in the same order as before.

// The arrays come as JSON (parsed natively; pg's array parser reads text a character at a time).
// When a result was excluded does not matter to the figures: only whether.
export type ClassFigureRow = Omit<ClassRow, 'molePercents' | 'unitKey' | 'exclusionReason' | 'excludedAt'> & { excluded: boolean }

export interface ClassColumns {
  rows: ClassFigureRow[]
  excluded: Array<{ submissionId: number, sectionId: number, exclusionReason: string | null }>
  /** Percents of each product SMILES over the results not excluded. */
  percentsOf: Map<string, number[]>
  /** The sections running the practical, in code order. */
  sections: Array<{ id: number, code: string }>
  /** A hash of every value the class figures are computed from (see rememberedClassFigures). */
  fingerprint: string
}

interface ColumnsRow {
  ids: number[] | null
  sectionIds: number[] | null
  statuses: SubmissionStatus[] | null
  secondary: Array<number | null> | null
  tertiary: Array<number | null> | null
  /** Whether each was excluded; when, only for the ones listed in excludedRows. */
  excluded: boolean[] | null
  excludedRows: ClassColumns['excluded'] | null
  percents: Array<{ smiles: string, percents: number[] }> | null
  sections: ClassColumns['sections'] | null
}

export async function classColumns(practicalId: number): Promise<ClassColumns> {
  const { rows: [row] } = await sql<ColumnsRow>`with latest as (
      select distinct on (s.unit_key) s.id, s.section_id, s.unit_key, s.status, s.factor_secondary, s.factor_tertiary,
        s.result -> 'molePercents' as mole_percents, s.excluded_at, s.exclusion_reason
      from submissions s where s.practical_id = ${practicalId} and s.status in ('pending', 'accepted')
      order by s.unit_key, s.version desc)
    select l.*,
      (select json_agg(json_build_object('smiles', smiles, 'percents', percents)) from (
        select m.entry ->> 'smiles' as smiles, array_agg((m.entry ->> 'percent')::float8 order by latest.unit_key, m.n) as percents
        from latest cross join lateral jsonb_array_elements(latest.mole_percents) with ordinality as m(entry, n)
        where latest.excluded_at is null group by 1) p) as percents,
      (select json_agg(json_build_object('id', s.id, 'code', s.code) order by s.code)
        from practical_sessions ps join sections s on s.id = ps.section_id where ps.practical_id = ${practicalId}) as sections
    from (select to_json(array_agg(id order by unit_key)) as ids, to_json(array_agg(section_id order by unit_key)) as section_ids,
        to_json(array_agg(status::text order by unit_key)) as statuses,
        to_json(array_agg(factor_secondary order by unit_key)) as secondary,
        to_json(array_agg(factor_tertiary order by unit_key)) as tertiary,
        to_json(array_agg(excluded_at is not null order by unit_key)) as excluded,
        json_agg(json_build_object('submissionId', id, 'sectionId', section_id, 'exclusionReason', exclusion_reason)
          order by unit_key) filter (where excluded_at is not null) as excluded_rows
      from latest) l`.execute(useDb())
  const ids = row?.ids ?? []
  const rows = ids.map((submissionId, i): ClassFigureRow => ({
    submissionId,
    sectionId: row!.sectionIds![i]!,
    status: row!.statuses![i]!,
    factorSecondary: row!.secondary![i] ?? null,
    factorTertiary: row!.tertiary![i] ?? null,
    excluded: row!.excluded![i]!,
  }))
  return {
    rows,
    fingerprint: fingerprintOf(row),
    excluded: row?.excludedRows ?? [],
    percentsOf: new Map((row?.percents ?? []).map((p) => [p.smiles, p.percents])),
    sections: row?.sections ?? [],
  }
}

/** The ids, sections, statuses, factors and exclusions read, hashed as bytes (a few ms at 20,000). */
function fingerprintOf(row: ColumnsRow | undefined): string {
  const hash = createHash('sha256')
  // A stored NaN is counted as "not finite", a null is not counted: nulls are marked apart.
  const numbers = (xs: Array<number | null> | null) => {
    hash.update(new Uint8Array(Float64Array.from(xs ?? [], (x) => x ?? Number.NaN).buffer))
    hash.update((xs ?? []).map((x) => (x === null ? 'n' : '.')).join(''))
  }
  numbers(row?.ids ?? null)
  numbers(row?.sectionIds ?? null)
  numbers(row?.secondary ?? null)
  numbers(row?.tertiary ?? null)
  hash.update((row?.statuses ?? []).join(',')).update('|')
  hash.update((row?.excluded ?? []).map((at) => (at ? '1' : '0')).join(''))
  return hash.digest('base64url')
}
