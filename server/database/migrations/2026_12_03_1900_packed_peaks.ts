import { type Kysely, sql } from 'kysely'

// A version's peaks move from submissions.parsed (jsonb, one object per peak) to
// submissions.peaks (bytea, column by column as float64; the layout is described in
// shared/utils/lib/stored-peaks.ts, format 1). Measured on the upload benchmark's 5,000-row
// table (npm run bench -- uploads): the jsonb was 370 kB of text that PostgreSQL parsed on every
// upload, 12-24 ms of the insert; the packed peaks are 160 kB stored as sent, 1-2 ms. An empty
// value means no peaks. Frozen in time: the format-1 packing is written out here, not imported
// (tests/unit/stored-peaks.test.ts checks that both write the same bytes).

const OPTIONAL = [['areaPercent', 1], ['height', 2], ['row', 4]] as const
type JsonPeak = Record<string, unknown>

export function pack(peaks: JsonPeak[]): Buffer {
  const n = peaks.length
  if (n === 0) return Buffer.alloc(0)
  const present = OPTIONAL.filter(([key]) => peaks.some((p) => typeof p[key] === 'number'))
  const labels: string[] = []
  const codes = peaks.map((p) => {
    if (typeof p.assignedTo !== 'string') return 0
    const at = labels.indexOf(p.assignedTo)
    return at >= 0 ? at + 1 : labels.push(p.assignedTo)
  })
  const labelBytes = Buffer.from(JSON.stringify(labels))
  const columnsAt = Math.ceil((12 + labelBytes.length) / 8) * 8
  const columns = [['retentionTime'], ['area'], ...present]
  const out = Buffer.alloc(columnsAt + columns.length * 8 * n + 2 * n)
  out.writeUInt8(1, 0)
  out.writeUInt8(present.reduce((mask, [, bit]) => mask | bit, 0), 1)
  out.writeUInt16LE(labels.length, 2)
  out.writeUInt32LE(n, 4)
  out.writeUInt32LE(labelBytes.length, 8)
  labelBytes.copy(out, 12)
  columns.forEach(([key], c) => peaks.forEach((p, i) => {
    const v = p[key!]
    out.writeDoubleLE(typeof v === 'number' ? v : Number.NaN, columnsAt + (c * n + i) * 8)
  }))
  codes.forEach((code, i) => out.writeUInt16LE(code, columnsAt + columns.length * 8 * n + 2 * i))
  return out
}

export function unpack(bytes: Buffer): JsonPeak[] {
  if (bytes.length === 0) return []
  const mask = bytes.readUInt8(1)
  const n = bytes.readUInt32LE(4)
  const labelLength = bytes.readUInt32LE(8)
  const labels = JSON.parse(bytes.subarray(12, 12 + labelLength).toString()) as string[]
  const columnsAt = Math.ceil((12 + labelLength) / 8) * 8
  const columns = [['retentionTime'], ['area'], ...OPTIONAL.filter(([, bit]) => mask & bit)]
  return Array.from({ length: n }, (_, i) => {
    const peak: JsonPeak = {}
    columns.forEach(([key], c) => {
      const v = bytes.readDoubleLE(columnsAt + (c * n + i) * 8)
      if (!Number.isNaN(v)) peak[key!] = v
    })
    const code = bytes.readUInt16LE(columnsAt + columns.length * 8 * n + 2 * i)
    peak.assignedTo = code ? labels[code - 1] : null
    return peak
  })
}

const BATCH = 500

/** Rewrites one column from another, a batch of rows at a time, in id order. */
async function convert<T>(db: Kysely<any>, read: string, write: string, cast: string, change: (value: T) => unknown) {
  for (let after = 0; ;) {
    const { rows } = await sql<{ id: number, value: T }>`
      select id, ${sql.ref(read)} as value from submissions where id > ${after} order by id limit ${BATCH}`.execute(db)
    if (!rows.length) return
    const values = rows.map((r) => change(r.value))
    await sql`update submissions s set ${sql.ref(write)} = v.value
      from unnest(${rows.map((r) => r.id)}::int[], ${values}::${sql.raw(cast)}[]) as v(id, value) where s.id = v.id`.execute(db)
    after = rows[rows.length - 1]!.id
  }
}

async function hasLz4(db: Kysely<any>): Promise<boolean> {
  const { rows } = await sql<{ lz4: boolean }>`
    select 'lz4' = any(enumvals) as lz4 from pg_settings where name = 'default_toast_compression'`.execute(db)
  return rows[0]?.lz4 === true
}

export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table submissions add column peaks bytea not null default ''::bytea`.execute(db)
  // pglz spent milliseconds failing to shrink float64s; lz4 gives up fast, else none is tried.
  if (await hasLz4(db)) await sql`alter table submissions alter column peaks set compression lz4`.execute(db)
  else await sql`alter table submissions alter column peaks set storage external`.execute(db)
  await convert<JsonPeak[]>(db, 'parsed', 'peaks', 'bytea', (parsed) => pack(Array.isArray(parsed) ? parsed : []))
  await sql`alter table submissions drop column parsed`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table submissions add column parsed jsonb not null default '[]'::jsonb`.execute(db)
  await convert<Buffer>(db, 'peaks', 'parsed', 'jsonb', (peaks) => JSON.stringify(unpack(peaks)))
  await sql`alter table submissions alter column parsed drop default`.execute(db)
  await sql`alter table submissions drop column peaks`.execute(db)
}
