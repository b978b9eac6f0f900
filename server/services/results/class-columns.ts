import { sql, type RawBuilder } from 'kysely'
import { useDb } from '../../utils/db'

// The class summary's read, shaped by PostgreSQL: at 20,000 results, reading a row (and a JSON
// document of mole percents) per unit cost more than the statistics. The same rows as
// latestClassResults (each unit's newest accepted-or-pending version, unit order), returned as
// one JSON document of arrays (server/engines/class-summary.ts reads it); the mole percents come
// already gathered per product, in unit order and then in their stored order, so the means are
// summed in the same order as before.
//
// The document arrives as text: pg would parse it on the request loop, and at 20,000 results the
// engine worker parses it instead, next to the statistics that need it.

// What a summary depends on, cheap to read. PostgreSQL stamps every row it inserts or updates
// with the id of the transaction that wrote it (`xmin`), and ids only grow: between two reads,
// the rows that appeared carry larger ids than the rows that went, so if the count is the same
// the sum of the ids is not. The count and sum over the practical's versions therefore change
// with every upload, review, return or exclusion, and those over the substrate, method, windows,
// product names and reference distributions with any edit of the chemistry; the sections are read
// whole (a few codes). Nothing is hashed and no value is read.
// An id is a value, or a column of the statement around (`p.id` when read with the scope).
type IdOrColumn = number | RawBuilder<number>
const stamp = (table: string, column: string, id: IdOrColumn) => sql`(select json_build_array(count(*), sum(xmin::text::bigint))
    from ${sql.table(table)} where ${sql.ref(column)} = ${id})`
const submissionsStamp = (practicalId: number) => sql<string>`${stamp('submissions', 'practical_id', practicalId)}::text`
const sectionsJson = (practicalId: IdOrColumn) => sql`(select
    coalesce(json_agg(json_build_object('id', s.id, 'code', s.code) order by s.code), '[]')
    from practical_sessions ps join sections s on s.id = ps.section_id where ps.practical_id = ${practicalId})`
const sectionsSql = (practicalId: number) => sql<string>`${sectionsJson(practicalId)}::text`

export interface ClassFingerprint {
  /** Changes whenever a version of the practical is added, reviewed, returned or excluded (JSON text). */
  fingerprint: string
  /** The sections running the practical ({ id, code }, in code order), as JSON text. */
  sections: string
  /** Versions of the practical, of any status: an upper bound on the results counted. */
  versions: number
}

type PracticalIds = { id: IdOrColumn, substrateId: IdOrColumn, methodId: IdOrColumn }

/** What a summary is made of, as one JSON text: [the class's stamp, its sections, the chemistry's stamps]. */
const fingerprintSql = (practical: PracticalIds) => sql<string>`json_build_array(
    ${stamp('submissions', 'practical_id', practical.id)}, ${sectionsJson(practical.id)},
    json_build_array(${stamp('substrates', 'id', practical.substrateId)}, ${stamp('methods', 'id', practical.methodId)},
      ${stamp('substrate_windows', 'substrate_id', practical.substrateId)},
      ${stamp('substrate_product_names', 'substrate_id', practical.substrateId)},
      ${stamp('substrate_references', 'substrate_id', practical.substrateId)}))::text`

export interface PracticalFingerprint {
  /** Changes with every version added, reviewed, returned or excluded, the sections and any edit of the chemistry. */
  text: string
  /** Versions of the practical, of any status: an upper bound on the results counted. */
  versions: number
}

export const practicalFingerprintOf = (text: string): PracticalFingerprint => ({ text, versions: Number(JSON.parse(text)[0][0]) })

/**
 * The fingerprint as a column over the practical `p` of requirePracticalAccessWith: a remembered
 * summary is found in the scope check's own round trip.
 */
export const practicalFingerprintColumn = () =>
  fingerprintSql({ id: sql`p.id`, substrateId: sql`p.substrate_id`, methodId: sql`p.method_id` })

/** The fingerprint of a practical (as practicalFingerprintColumn), in a statement of its own. */
export async function practicalFingerprint(
  practical: { id: number, substrateId: number, methodId: number },
): Promise<PracticalFingerprint> {
  const { rows: [row] } = await sql<{ fingerprint: string }>`select ${fingerprintSql(practical)} as fingerprint`.execute(useDb())
  return practicalFingerprintOf(row!.fingerprint)
}

export interface ClassColumnsText extends ClassFingerprint {
  /** ClassColumns (server/engines/class-summary.ts) as JSON text. */
  columns: string
}

/** The class's rows as one JSON document, with the fingerprint read in the same snapshot. */
export async function classColumnsText(practicalId: number): Promise<ClassColumnsText> {
  const { rows: [row] } = await sql<{ columns: string, fingerprint: string, sections: string }>`with latest as (
      select distinct on (s.unit_key) s.id, s.section_id, s.unit_key, s.status, s.factor_secondary, s.factor_tertiary,
        s.result -> 'molePercents' as mole_percents, s.excluded_at, s.exclusion_reason
      from submissions s where s.practical_id = ${practicalId} and s.status in ('pending', 'accepted')
      order by s.unit_key, s.version desc)
    select json_build_object('ids', l.ids, 'sectionIds', l.section_ids, 'statuses', l.statuses, 'secondary', l.secondary,
        'tertiary', l.tertiary, 'excluded', l.excluded, 'excludedRows', l.excluded_rows,
        'percents', (select json_agg(json_build_object('smiles', smiles, 'percents', percents)) from (
          select m.entry ->> 'smiles' as smiles, array_agg((m.entry ->> 'percent')::float8 order by latest.unit_key, m.n) as percents
          from latest cross join lateral jsonb_array_elements(latest.mole_percents) with ordinality as m(entry, n)
          where latest.excluded_at is null group by 1) p))::text as columns,
      ${submissionsStamp(practicalId)} as fingerprint, ${sectionsSql(practicalId)} as sections
    from (select array_agg(id order by unit_key) as ids, array_agg(section_id order by unit_key) as section_ids,
        array_agg(status::text order by unit_key) as statuses,
        array_agg(factor_secondary order by unit_key) as secondary,
        array_agg(factor_tertiary order by unit_key) as tertiary,
        array_agg(excluded_at is not null order by unit_key) as excluded,
        json_agg(json_build_object('submissionId', id, 'sectionId', section_id, 'exclusionReason', exclusion_reason)
          order by unit_key) filter (where excluded_at is not null) as excluded_rows
      from latest) l`.execute(useDb())
  return { ...row!, versions: Number(JSON.parse(row!.fingerprint)[0]) }
}
