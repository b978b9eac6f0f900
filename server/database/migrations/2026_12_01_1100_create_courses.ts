import { type Kysely, sql } from 'kysely'

const now = sql`now()`

// The term: courses, sections and their people, the substrate and method library, practicals.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('courses')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('term', 'text', (c) => c.notNull())
    // Meeting times are wall-clock times in this zone; instants are derived from them.
    .addColumn('timezone', 'text', (c) => c.notNull().defaultTo('America/Chicago'))
    .addColumn('outlier_test', 'text', (c) => c.notNull().defaultTo('grubbs').check(sql`outlier_test in ('grubbs', 'dixon', 'modified-z')`))
    .addColumn('outlier_alpha', 'numeric', (c) => c.notNull().defaultTo(0.05).check(sql`outlier_alpha in (0.05, 0.10)`))
    .addColumn('zscore_limit', 'numeric', (c) => c.notNull().defaultTo(3.5).check(sql`zscore_limit > 0`))
    .addColumn('accuracy_tolerance_percent', 'numeric', (c) => c.notNull().defaultTo(15).check(sql`accuracy_tolerance_percent > 0`))
    .addColumn('release_policy', 'text', (c) => c.notNull().defaultTo('on-review')
      .check(sql`release_policy in ('on-review', 'after-due', 'manual')`))
    .addColumn('rubric', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addUniqueConstraint('courses_code_term', ['code', 'term'])
    .execute()

  await db.schema
    .createTable('course_owners')
    .addColumn('course_id', 'integer', (c) => c.notNull().references('courses.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addPrimaryKeyConstraint('course_owners_pk', ['course_id', 'user_id'])
    .execute()

  await db.schema
    .createTable('sections')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('course_id', 'integer', (c) => c.notNull().references('courses.id').onDelete('cascade'))
    .addColumn('code', 'text', (c) => c.notNull())
    // ISO weekday: 1 = Monday … 7 = Sunday.
    .addColumn('weekday', 'smallint', (c) => c.notNull().check(sql`weekday between 1 and 7`))
    .addColumn('start_time', 'time', (c) => c.notNull())
    .addColumn('end_time', 'time', (c) => c.notNull())
    .addColumn('room', 'text', (c) => c.notNull())
    .addColumn('hood_stations', 'integer', (c) => c.notNull().check(sql`hood_stations between 1 and 200`))
    .addColumn('students_per_station', 'integer', (c) => c.notNull().defaultTo(2).check(sql`students_per_station between 1 and 4`))
    .addColumn('first_date', 'date', (c) => c.notNull())
    .addColumn('last_date', 'date', (c) => c.notNull())
    .addColumn('skipped_dates', sql`date[]`, (c) => c.notNull().defaultTo(sql`'{}'::date[]`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addUniqueConstraint('sections_course_code', ['course_id', 'code'])
    .addCheckConstraint('sections_times', sql`end_time > start_time`)
    .addCheckConstraint('sections_dates', sql`last_date >= first_date`)
    .execute()

  await db.schema
    .createTable('section_tas')
    .addColumn('section_id', 'integer', (c) => c.notNull().references('sections.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addPrimaryKeyConstraint('section_tas_pk', ['section_id', 'user_id'])
    .execute()
  await db.schema.createIndex('section_tas_user').on('section_tas').column('user_id').execute()

  await db.schema
    .createTable('enrollments')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    // Denormalised so "one active section per student per course" is a plain unique index.
    .addColumn('course_id', 'integer', (c) => c.notNull().references('courses.id').onDelete('cascade'))
    .addColumn('section_id', 'integer', (c) => c.notNull().references('sections.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('active').check(sql`status in ('active', 'withdrawn')`))
    .addColumn('station', 'integer')
    .addColumn('seat', 'smallint')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('withdrawn_at', 'timestamptz')
    .execute()
  await db.schema.createIndex('enrollments_active_student').on('enrollments')
    .columns(['course_id', 'user_id']).unique().where(sql.ref('status'), '=', 'active')
    .execute()
  await db.schema.createIndex('enrollments_section').on('enrollments').columns(['section_id', 'status']).execute()
  await db.schema.createIndex('enrollments_user').on('enrollments').column('user_id').execute()
  // Two students cannot hold the same seat at the same station.
  await db.schema.createIndex('enrollments_seat').on('enrollments')
    .columns(['section_id', 'station', 'seat']).unique().where(sql<boolean>`status = 'active' and station is not null`)
    .execute()

  await db.schema
    .createTable('invitations')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    // Only the hash is kept: a database read does not yield working links.
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  // Every uploaded file, byte for byte: roster CSVs, standard runs, and later GC results.
  await db.schema
    .createTable('files')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('sha256', 'text', (c) => c.notNull())
    .addColumn('byte_size', 'integer', (c) => c.notNull())
    .addColumn('media_type', 'text', (c) => c.notNull())
    .addColumn('original_name', 'text', (c) => c.notNull())
    .addColumn('content', 'bytea', (c) => c.notNull())
    .addColumn('uploaded_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()
  await db.schema.createIndex('files_sha256').on('files').column('sha256').execute()

  await db.schema
    .createTable('roster_imports')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('course_id', 'integer', (c) => c.notNull().references('courses.id').onDelete('cascade'))
    .addColumn('file_id', 'integer', (c) => c.notNull().references('files.id'))
    .addColumn('mapping', 'jsonb', (c) => c.notNull())
    .addColumn('summary', 'jsonb', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  await db.schema
    .createTable('substrates')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('smiles', 'text', (c) => c.notNull())
    .addColumn('formula', 'text', (c) => c.notNull())
    .addColumn('molar_mass', 'numeric', (c) => c.notNull())
    .addColumn('density', 'numeric', (c) => c.check(sql`density > 0`))
    .addColumn('boiling_point_c', 'numeric')
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('source', 'text', (c) => c.notNull().defaultTo(''))
    // null: part of the shared library every instructor can use.
    .addColumn('owner_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  await db.schema
    .createTable('substrate_windows')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('substrate_id', 'integer', (c) => c.notNull().references('substrates.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('product', 'solvent', 'starting-material')`))
    .addColumn('product_smiles', 'text')
    .addColumn('label', 'text', (c) => c.notNull())
    .addColumn('rt_min', 'numeric', (c) => c.notNull())
    .addColumn('rt_max', 'numeric', (c) => c.notNull())
    .addColumn('response_factor', 'numeric', (c) => c.notNull().defaultTo(1).check(sql`response_factor > 0`))
    .addCheckConstraint('substrate_windows_range', sql`rt_max > rt_min and rt_min >= 0`)
    .addCheckConstraint('substrate_windows_product', sql`(kind = 'product') = (product_smiles is not null)`)
    .execute()
  await db.schema.createIndex('substrate_windows_product').on('substrate_windows')
    .columns(['substrate_id', 'product_smiles']).unique().where(sql<boolean>`product_smiles is not null`)
    .execute()
  await db.schema.createIndex('substrate_windows_kind').on('substrate_windows')
    .columns(['substrate_id', 'kind']).unique().where(sql<boolean>`kind <> 'product'`)
    .execute()

  await db.schema
    .createTable('standard_runs')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('substrate_id', 'integer', (c) => c.notNull().references('substrates.id').onDelete('cascade'))
    .addColumn('file_id', 'integer', (c) => c.notNull().references('files.id'))
    .addColumn('peaks', 'jsonb', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  await db.schema
    .createTable('methods')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('reagent', 'text', (c) => c.notNull().check(sql`reagent in ('cl2-light', 'so2cl2-azo', 'br2-light', 'nbs')`))
    .addColumn('halogen', 'text', (c) => c.notNull().check(sql`halogen in ('Cl', 'Br')`))
    .addColumn('temperature_c', 'numeric', (c) => c.notNull())
    .addColumn('r_primary', 'numeric', (c) => c.notNull().check(sql`r_primary > 0`))
    .addColumn('r_secondary', 'numeric', (c) => c.notNull().check(sql`r_secondary >= 0`))
    .addColumn('r_tertiary', 'numeric', (c) => c.notNull().check(sql`r_tertiary >= 0`))
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('owner_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  await db.schema
    .createTable('practicals')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('course_id', 'integer', (c) => c.notNull().references('courses.id').onDelete('cascade'))
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('substrate_id', 'integer', (c) => c.notNull().references('substrates.id'))
    .addColumn('method_id', 'integer', (c) => c.notNull().references('methods.id'))
    // Quantities are per work unit: one student, or one pair at a hood station.
    .addColumn('work_unit', 'text', (c) => c.notNull().defaultTo('pair').check(sql`work_unit in ('student', 'pair')`))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('results_released_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  // What each work unit uses: the substrate, halogenating agent, initiator, solvent, washes.
  await db.schema
    .createTable('practical_items')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('practical_id', 'integer', (c) => c.notNull().references('practicals.id').onDelete('cascade'))
    .addColumn('position', 'smallint', (c) => c.notNull())
    .addColumn('role', 'text', (c) => c.notNull()
      .check(sql`role in ('substrate', 'halogenating-agent', 'initiator', 'solvent', 'wash', 'drying-agent', 'other')`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('smiles', 'text')
    .addColumn('molar_mass', 'numeric')
    .addColumn('density', 'numeric')
    // mmol: of this item; equivalents and mol-percent: relative to the substrate's mmol.
    .addColumn('basis', 'text', (c) => c.notNull().check(sql`basis in ('mmol', 'equivalents', 'mol-percent', 'mL', 'g')`))
    .addColumn('amount', 'numeric', (c) => c.notNull().check(sql`amount >= 0`))
    .execute()
  await db.schema.createIndex('practical_items_practical').on('practical_items').columns(['practical_id', 'position']).execute()

  await db.schema
    .createTable('practical_sessions')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('practical_id', 'integer', (c) => c.notNull().references('practicals.id').onDelete('cascade'))
    .addColumn('section_id', 'integer', (c) => c.notNull().references('sections.id').onDelete('cascade'))
    .addColumn('meeting_date', 'date', (c) => c.notNull())
    .addColumn('due_at', 'timestamptz', (c) => c.notNull())
    .addUniqueConstraint('practical_sessions_unique', ['practical_id', 'section_id'])
    .execute()
  await db.schema.createIndex('practical_sessions_section').on('practical_sessions').columns(['section_id', 'meeting_date']).execute()

  await db.schema
    .createTable('calendar_feeds')
    .addColumn('user_id', 'integer', (c) => c.primaryKey().references('users.id').onDelete('cascade'))
    .addColumn('token', 'text', (c) => c.notNull().unique())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()

  await db.schema.alterTable('mail_messages')
    .addColumn('course_id', 'integer', (c) => c.references('courses.id').onDelete('set null'))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('mail_messages').dropColumn('course_id').execute()
  for (const table of ['calendar_feeds', 'practical_sessions', 'practical_items', 'practicals', 'methods', 'standard_runs',
    'substrate_windows', 'substrates', 'roster_imports', 'files', 'invitations', 'enrollments', 'section_tas', 'sections',
    'course_owners', 'courses']) {
    await db.schema.dropTable(table).execute()
  }
}
