import { type Kysely, sql } from 'kysely'

// The shared library's source lines read as references: our own "from memory" notes move out of
// what students see (the kind of source still says a value was recalled). Only the seeded rows
// (no owner) with the old wording change; an instructor's own text is theirs.
const CHANGES: Array<{ table: 'methods' | 'substrates' | 'substrate_references', from: string, to: string }> = [
  {
    table: 'methods',
    from: 'textbook value, from memory',
    to: 'textbook value (relative reactivity per H of bromine atoms, about 125 °C)',
  },
  {
    table: 'substrates',
    from: 'CRC Handbook of Chemistry and Physics, from memory',
    to: 'CRC Handbook of Chemistry and Physics, table of physical constants of organic compounds',
  },
  {
    table: 'substrate_references',
    from: 'H. C. Brown and A. B. Ash, J. Am. Chem. Soc. 77 (1955): SO2Cl2 chlorination of 1-chlorobutane; rounded, from memory',
    to: 'H. C. Brown and A. B. Ash, J. Am. Chem. Soc. 77 (1955): SO2Cl2 chlorination of 1-chlorobutane, rounded',
  },
]

export async function up(db: Kysely<any>): Promise<void> {
  for (const c of CHANGES) {
    const seeded = c.table === 'substrate_references'
      ? sql`updated_by is null`
      : sql`owner_id is null`
    await sql`update ${sql.table(c.table)} set source = ${c.to} where source = ${c.from} and ${seeded}`.execute(db)
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const c of CHANGES) {
    await sql`update ${sql.table(c.table)} set source = ${c.from} where source = ${c.to}`.execute(db)
  }
}
